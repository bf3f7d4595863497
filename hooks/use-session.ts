import { queryOptions, useQuery } from "@tanstack/react-query";
import { z } from "zod";
import { api } from "@/lib/api-client";
import { me, sessionState } from "@/schemas/account";

export const sessionKeys = { all: ["session"] as const, me: () => [...sessionKeys.all, "me"] as const };

/** The signed-in user, or null for a visitor. */
const sessionQuery = () =>
  queryOptions({
    queryKey: sessionKeys.me(),
    queryFn: async ({ signal }) => (await api("/api/v1/session", sessionState, { signal })).user,
    staleTime: 5 * 60_000,
  });

export const useSession = () => useQuery(sessionQuery());
export type SessionUser = z.infer<typeof me>;
