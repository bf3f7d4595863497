import { Redirect, useRouter } from "expo-router";
import { View } from "react-native";
import { TextLink } from "@/components/account/auth-panel";
import { FollowedDatasets } from "@/components/account/followed-datasets";
import { ProfileForm } from "@/components/account/profile-form";
import { Screen } from "@/components/screen";
import { Button } from "@/components/ui/button";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { space } from "@/constants/theme";
import { useSignOutMutation } from "@/hooks/use-account";
import { useLayout } from "@/hooks/use-layout";
import { useSession } from "@/hooks/use-session";

const accountDescription = "Your Plotbank account: your name and password, and the datasets you follow.";

export default function AccountScreen() {
  const session = useSession();
  const signOut = useSignOutMutation();
  const router = useRouter();
  const { wide } = useLayout();

  if (session.isPending)
    return (
      <Screen title="Account" description={accountDescription}>
        <LoadingState />
      </Screen>
    );
  if (session.isError)
    return (
      <Screen title="Account" description={accountDescription}>
        <ErrorState error={session.error} onRetry={() => session.refetch()} />
      </Screen>
    );
  if (!session.data) return <Redirect href={"/sign-in?next=/account"} />;

  return (
    <Screen title="Account" subtitle={`Signed in as ${session.data.displayName}`} description={accountDescription}>
      <View style={{ flexDirection: wide ? "row" : "column", gap: space.lg, alignItems: wide ? "flex-start" : "stretch" }}>
        <View style={wide ? { flex: 1, gap: space.lg } : { gap: space.lg, alignSelf: "stretch" }}>
          <ProfileForm me={session.data} />
        </View>
        <View style={wide ? { flex: 1, gap: space.lg } : { gap: space.lg, alignSelf: "stretch" }}>
          <FollowedDatasets />
          {session.data.role === "admin" ? <TextLink href="/admin" label="People & roles (admin)" /> : null}
          <Button
            label="Sign out"
            tone="danger"
            busy={signOut.isPending}
            onPress={() => signOut.mutate(undefined, { onSuccess: () => router.replace("/sign-in") })}
          />
        </View>
      </View>
    </Screen>
  );
}
