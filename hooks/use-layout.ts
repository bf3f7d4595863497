import { useWindowDimensions } from "react-native";
import { wideBreakpoint } from "@/constants/theme";

/** The one place that decides phone vs wide; screens ask this hook instead of measuring themselves. */
export function useLayout() {
  const { width } = useWindowDimensions();
  return { wide: width >= wideBreakpoint, width };
}
