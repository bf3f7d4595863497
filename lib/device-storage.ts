import AsyncStorage from "@react-native-async-storage/async-storage";
import { z } from "zod";
import type { Prices } from "./share-link";

const pricesKey = "plotbank:evidence-prices:v1";
const storedPrices = z.object({
  price: z.number().positive().optional(),
  productCost: z.number().min(0).optional(),
  applicationCost: z.number().min(0).optional(),
});

/** The grower's prices are remembered on this device between visits (AsyncStorage; localStorage on the web). */
export async function loadPrices(): Promise<Prices> {
  try {
    const raw = await AsyncStorage.getItem(pricesKey);
    if (!raw) return {};
    const parsed = storedPrices.safeParse(JSON.parse(raw));
    return parsed.success ? parsed.data : {};
  } catch {
    // Storage can be unavailable (private browsing); prices then live only in the URL.
    return {};
  }
}

export async function savePrices(prices: Prices): Promise<void> {
  try {
    await AsyncStorage.setItem(pricesKey, JSON.stringify(prices));
  } catch {
    // See loadPrices.
  }
}
