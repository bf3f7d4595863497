import { queryOptions, useQuery } from "@tanstack/react-query";
import { z } from "zod";
import { api } from "@/lib/api-client";
import { ApiError } from "@/lib/api-error";
import { me } from "@/schemas/account";

export const sessionKeys = { all: ["session"] as const, me: () => [...sessionKeys.all, "me"] as const };

/** The signed-in user, or null for a visitor (a 401 is an answer here, not an error). */
export const sessionQuery = () =>
  queryOptions({
    queryKey: sessionKeys.me(),
    queryFn: async ({ signal }) => {
      try {
        return await api("/api/v1/session", me, { signal });
      } catch (error) {
        if (error instanceof ApiError && error.status === 401) return null;
        throw error;
      }
    },
    staleTime: 5 * 60_000,
  });

export const useSession = () => useQuery(sessionQuery());
export type SessionUser = z.infer<typeof me>;
