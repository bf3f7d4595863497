import { useFonts } from "expo-font";
import { fontAssets } from "@/constants/fonts";

/** Native: the shipped TTFs are registered before the first render (system fonts if that fails). */
export function useAppFontsReady(): boolean {
  const [loaded, error] = useFonts(fontAssets);
  return loaded || !!error;
}
