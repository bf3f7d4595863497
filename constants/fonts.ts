/**
 * Inter (SIL Open Font License, assets/fonts/OFL.txt), shipped with the app so nothing is fetched at run time. The
 * files are copies from @expo-google-fonts/inter 0.4.2 (a dev dependency); tests/unit/font-provenance.test.ts checks
 * they match it byte for byte.
 */
export const fontAssets = {
  Inter_400Regular: require("@/assets/fonts/Inter_400Regular.ttf"),
  Inter_500Medium: require("@/assets/fonts/Inter_500Medium.ttf"),
  Inter_600SemiBold: require("@/assets/fonts/Inter_600SemiBold.ttf"),
  Inter_700Bold: require("@/assets/fonts/Inter_700Bold.ttf"),
};
