import { QueryClientProvider } from "@tanstack/react-query";
import { PersistQueryClientProvider } from "@tanstack/react-query-persist-client";
import { Stack } from "expo-router";
import { StatusBar } from "expo-status-bar";
import { useState } from "react";
import { AppFrame } from "@/components/app-frame";
import { useAppFontsReady } from "@/hooks/use-app-fonts";
import { makeQueryClient, persistOptions } from "@/lib/query-client";

export default function RootLayout() {
  // Native waits for the shipped TTFs (or their failure); the web never waits (font-display: swap).
  const fontsReady = useAppFontsReady();
  const [queryClient] = useState(makeQueryClient);
  const [persist] = useState(persistOptions);
  if (!fontsReady) return null;
  const tree = (
    <>
      <StatusBar style="dark" />
      <AppFrame>
        <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: "transparent" } }} />
      </AppFrame>
    </>
  );
  return persist ? (
    <PersistQueryClientProvider client={queryClient} persistOptions={persist}>
      {tree}
    </PersistQueryClientProvider>
  ) : (
    <QueryClientProvider client={queryClient}>{tree}</QueryClientProvider>
  );
}
