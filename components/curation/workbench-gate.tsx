import { Link, usePathname } from "expo-router";
import { Pressable, StyleSheet } from "react-native";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap } from "@/constants/theme";
import { staffRoles } from "@/constants/vocabulary";
import { useSession, type SessionUser } from "@/hooks/use-session";

const workbenchRoles = new Set<string>(staffRoles);

/** The workbench is for curators, reviewers and admins; everyone else is told why and where to sign in. */
export function WorkbenchGate({ children }: { children: (user: SessionUser) => React.ReactNode }) {
  const session = useSession();
  const pathname = usePathname();
  if (session.isPending) return <LoadingState label="Checking who you are…" />;
  if (session.isError) return <ErrorState error={session.error} onRetry={() => session.refetch()} />;
  const user = session.data;
  if (!user) {
    return (
      <EmptyState
        title="Sign in to use the workbench"
        hint="Curators prepare and submit dataset versions here; reviewers approve them."
        action={
          <Link href={`/sign-in?next=${encodeURIComponent(pathname)}`} asChild>
            <Pressable role="link" accessibilityLabel="Sign in" style={styles.link}>
              <Text style={styles.linkText}>Sign in</Text>
            </Pressable>
          </Link>
        }
      />
    );
  }
  if (!workbenchRoles.has(user.role)) {
    return (
      <EmptyState title="The workbench is for curators and reviewers" hint="Ask an administrator if you need to publish trial data." />
    );
  }
  return <>{children(user)}</>;
}

const styles = StyleSheet.create({
  link: { minHeight: minTap, justifyContent: "center", paddingHorizontal: 16 },
  linkText: { color: colors.field, fontFamily: fonts.semibold, textDecorationLine: "underline" },
});
