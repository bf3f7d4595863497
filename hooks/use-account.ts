import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api, apiNoContent } from "@/lib/api-client";
import {
  adminUser,
  adminUserList,
  checkEmail,
  failedJobList,
  followList,
  followState,
  invitationEntry,
  invitationList,
  invitationPreview,
  jobRetried,
  me,
  outboxList,
  outboxMessage,
  roleChangeList,
  type ProfilePatch,
  type Role,
} from "@/schemas/account";
import { sessionKeys } from "./use-session";

/** Query keys for the account screens, general to specific. */
const accountKeys = {
  all: ["account"] as const,
  profile: () => [...accountKeys.all, "profile"] as const,
  follows: () => [...accountKeys.all, "follows"] as const,
  invitation: (token: string) => [...accountKeys.all, "invitation", token] as const,
  admin: () => [...accountKeys.all, "admin"] as const,
  users: () => [...accountKeys.admin(), "users"] as const,
  roleChanges: () => [...accountKeys.admin(), "role-changes"] as const,
  failedJobs: () => [...accountKeys.admin(), "failed-jobs"] as const,
  invitations: () => [...accountKeys.admin(), "invitations"] as const,
  outbox: () => [...accountKeys.admin(), "outbox"] as const,
  outboxMessage: (id: string) => [...accountKeys.outbox(), id] as const,
};

// Account data is private and changes by the user's own hand; mutations invalidate it, so no long stale time.
const verified = z.object({ email: z.string(), verified: z.literal(true) });

const followsQuery = () =>
  queryOptions({ queryKey: accountKeys.follows(), queryFn: ({ signal }) => api("/api/v1/account/follows", followList, { signal }) });
const invitationQuery = (token: string) =>
  queryOptions({
    queryKey: accountKeys.invitation(token),
    queryFn: ({ signal }) => api("/api/v1/invitations/preview", invitationPreview, { method: "POST", body: { token }, signal }),
    retry: false,
  });
const adminUsersQuery = () =>
  queryOptions({ queryKey: accountKeys.users(), queryFn: ({ signal }) => api("/api/v1/admin/users", adminUserList, { signal }) });
const roleChangesQuery = () =>
  queryOptions({
    queryKey: accountKeys.roleChanges(),
    queryFn: ({ signal }) => api("/api/v1/admin/role-changes", roleChangeList, { signal }),
  });
const invitationsQuery = () =>
  queryOptions({
    queryKey: accountKeys.invitations(),
    queryFn: ({ signal }) => api("/api/v1/admin/invitations", invitationList, { signal }),
  });
const outboxQuery = () =>
  queryOptions({ queryKey: accountKeys.outbox(), queryFn: ({ signal }) => api("/api/v1/admin/outbox", outboxList, { signal }) });
const outboxMessageQuery = (id: string) =>
  queryOptions({
    queryKey: accountKeys.outboxMessage(id),
    queryFn: ({ signal }) => api(`/api/v1/admin/outbox/${encodeURIComponent(id)}`, outboxMessage, { signal }),
  });

export const useFollowsQuery = (enabled = true) => useQuery({ ...followsQuery(), enabled });
export const useInvitationQuery = (token: string) => useQuery({ ...invitationQuery(token), enabled: token.length > 0 });
export const useAdminUsersQuery = () => useQuery(adminUsersQuery());
export const useRoleChangesQuery = () => useQuery(roleChangesQuery());
export const useInvitationsQuery = () => useQuery(invitationsQuery());
export const useOutboxQuery = () => useQuery(outboxQuery());
export const useOutboxMessageQuery = (id: string) => useQuery(outboxMessageQuery(id));

/** Everything cached about "who I am" changes together on sign-in, sign-out and profile edits. */
function useRefreshIdentity() {
  const client = useQueryClient();
  return async () => {
    await client.invalidateQueries({ queryKey: sessionKeys.all });
    await client.invalidateQueries({ queryKey: accountKeys.all });
  };
}

export function useSignInMutation() {
  const refresh = useRefreshIdentity();
  return useMutation({
    mutationFn: (body: { email: string; password: string }) => api("/api/v1/session", me, { method: "POST", body }),
    onSuccess: refresh,
  });
}

export function useSignOutMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => apiNoContent("/api/v1/session", { method: "DELETE" }),
    onSuccess: () => {
      client.setQueryData(sessionKeys.me(), null);
      client.removeQueries({ queryKey: accountKeys.all });
    },
  });
}

export const useSignUpMutation = () =>
  useMutation({
    mutationFn: (body: { email: string; displayName: string; password: string }) =>
      api("/api/v1/sign-up", checkEmail, { method: "POST", body }),
  });

export const useVerifyEmailMutation = () =>
  useMutation({ mutationFn: (token: string) => api("/api/v1/email-verification", verified, { method: "POST", body: { token } }) });

export const useResendVerificationMutation = () =>
  useMutation({ mutationFn: (email: string) => api("/api/v1/email-verification/resend", checkEmail, { method: "POST", body: { email } }) });

export const useForgotPasswordMutation = () =>
  useMutation({ mutationFn: (email: string) => api("/api/v1/password-reset", checkEmail, { method: "POST", body: { email } }) });

export const useResetPasswordMutation = () =>
  useMutation({
    mutationFn: (body: { token: string; password: string }) => apiNoContent("/api/v1/password-reset/confirm", { method: "POST", body }),
  });

export const useAcceptInvitationMutation = () =>
  useMutation({
    mutationFn: (body: { token: string; displayName: string; password: string }) =>
      api("/api/v1/invitations/accept", me, { method: "POST", body }),
  });

export function useProfileMutation() {
  const refresh = useRefreshIdentity();
  return useMutation({
    mutationFn: (patch: ProfilePatch) => api("/api/v1/account", me, { method: "PATCH", body: patch }),
    onSuccess: refresh,
  });
}

export function useFollowMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ slug, follow }: { slug: string; follow: boolean }) =>
      api(`/api/v1/datasets/${encodeURIComponent(slug)}/follow`, followState, { method: follow ? "POST" : "DELETE" }),
    onSuccess: () => client.invalidateQueries({ queryKey: accountKeys.follows() }),
  });
}

export function useChangeRoleMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: Role }) =>
      api(`/api/v1/admin/users/${encodeURIComponent(userId)}`, adminUser, { method: "PATCH", body: { role } }),
    onSuccess: () => client.invalidateQueries({ queryKey: accountKeys.admin() }),
  });
}

export function useInviteMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: { email: string; role: "curator" | "reviewer" | "admin" }) =>
      api("/api/v1/admin/invitations", invitationEntry, { method: "POST", body }),
    onSuccess: () => client.invalidateQueries({ queryKey: accountKeys.admin() }),
  });
}

/** Background jobs that used up their attempts (admins). */
export const useFailedJobsQuery = () =>
  useQuery({ queryKey: accountKeys.failedJobs(), queryFn: ({ signal }) => api("/api/v1/admin/jobs/failed", failedJobList, { signal }) });

export function useRetryJobMutation() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api(`/api/v1/admin/jobs/${encodeURIComponent(id)}/retry`, jobRetried, { method: "POST" }),
    onSuccess: () => client.invalidateQueries({ queryKey: accountKeys.failedJobs() }),
  });
}
