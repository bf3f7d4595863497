/** Inter (SIL Open Font License, assets/fonts/OFL.txt), shipped with the app so nothing is fetched at run time. */
export const fontAssets = {
  Inter_400Regular: require("@/assets/fonts/Inter_400Regular.ttf"),
  Inter_500Medium: require("@/assets/fonts/Inter_500Medium.ttf"),
  Inter_600SemiBold: require("@/assets/fonts/Inter_600SemiBold.ttf"),
  Inter_700Bold: require("@/assets/fonts/Inter_700Bold.ttf"),
};
