import { Redirect } from "expo-router";
import { Screen } from "@/components/screen";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { useSession } from "@/hooks/use-session";

/**
 * Admin screens render only for admins. This is a courtesy: the server refuses every admin route to anyone else.
 */
export function AdminGate({ title, subtitle, children }: { title: string; subtitle?: string; children: React.ReactNode }) {
  const session = useSession();
  if (session.isPending)
    return (
      <Screen title={title}>
        <LoadingState />
      </Screen>
    );
  if (session.isError)
    return (
      <Screen title={title}>
        <ErrorState error={session.error} onRetry={() => session.refetch()} />
      </Screen>
    );
  if (!session.data) return <Redirect href={"/sign-in?next=/admin"} />;
  if (session.data.role !== "admin") {
    return (
      <Screen title={title}>
        <EmptyState title="For admins only" hint="Ask an admin if you need a different role." />
      </Screen>
    );
  }
  return (
    <Screen title={title} subtitle={subtitle}>
      {children}
    </Screen>
  );
}
