/** The Inter faces the app uses, by the names native builds register them under (constants/fonts.ts). */
export const interFaces = {
  regular: "Inter_400Regular",
  medium: "Inter_500Medium",
  semibold: "Inter_600SemiBold",
  bold: "Inter_700Bold",
} as const;
