import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api, apiNoContent } from "@/lib/api-client";
import { createdToken, tokenList, type CreateTokenBody } from "@/schemas/tokens";

const tokenKeys = {
  all: ["tokens"] as const,
  lists: () => [...tokenKeys.all, "list"] as const,
};

/** Token lists are private and change on every use (last used): never served stale. */
const tokenListQuery = () =>
  queryOptions({
    queryKey: tokenKeys.lists(),
    queryFn: ({ signal }) => api("/api/v1/tokens", tokenList, { signal }),
    staleTime: 0,
  });

export const useTokenList = (enabled = true) => useQuery({ ...tokenListQuery(), enabled });

export function useTokenCreateMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateTokenBody) => api("/api/v1/tokens", createdToken, { method: "POST", body }),
    onSuccess: () => client.invalidateQueries({ queryKey: tokenKeys.all }),
  });
}

export function useTokenRevokeMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => apiNoContent(`/api/v1/tokens/${id}`, { method: "DELETE" }),
    onSuccess: () => client.invalidateQueries({ queryKey: tokenKeys.all }),
  });
}
