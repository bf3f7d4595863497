import { Link, usePathname } from "expo-router";
import { Pressable, ScrollView, StyleSheet, View } from "react-native";
import { colors, fonts, minTap, space } from "@/constants/theme";
import { navItems, type NavItem } from "@/constants/navigation";
import { useLayout } from "@/hooks/use-layout";
import { useSession } from "@/hooks/use-session";
import type { Role } from "@/schemas/account";
import { Text } from "./ui/text";

function visibleItems(role: Role | undefined, signedIn: boolean): NavItem[] {
  return navItems.filter((item) => {
    if (item.visitorsOnly && signedIn) return false;
    if (!item.roles) return true;
    return role === "admin" || (role !== undefined && item.roles.includes(role));
  });
}

function NavLink({ item, active, compact }: { item: NavItem; active: boolean; compact: boolean }) {
  return (
    <Link href={item.href} asChild>
      <Pressable
        role="link"
        // The name a screen reader speaks starts with the words on screen (WCAG 2.5.3), then says the rest.
        accessibilityLabel={compact && item.short !== item.label ? `${item.short} (${item.label})` : undefined}
        aria-current={active ? "page" : undefined}
        // Link asChild merges styles through a Slot that needs a flat object, not an array.
        style={StyleSheet.flatten([compact ? styles.tab : styles.sideLink, active && (compact ? styles.tabActive : styles.sideLinkActive)])}
      >
        <Text style={[styles.navText, active && styles.navTextActive]} numberOfLines={1}>
          {compact ? item.short : item.label}
        </Text>
      </Pressable>
    </Link>
  );
}

/**
 * The app's chrome. On a phone: a top bar and a bottom tab bar. On a wide screen: a side navigation. Screens render
 * inside and never check the width for this themselves.
 */
export function AppFrame({ children }: { children: React.ReactNode }) {
  const { wide } = useLayout();
  const pathname = usePathname();
  const session = useSession();
  const items = visibleItems(session.data?.role, !!session.data);

  if (wide) {
    return (
      <View style={styles.wideRoot}>
        <View style={styles.side} role="navigation" accessibilityLabel="Main">
          <Link href="/" asChild>
            <Pressable role="link" style={styles.brandBox}>
              <Text style={styles.brand}>Plotbank</Text>
              <Text variant="caption">Fertilizer trial evidence</Text>
            </Pressable>
          </Link>
          {items.map((item) => (
            <NavLink key={item.href} item={item} active={item.match(pathname)} compact={false} />
          ))}
          {session.data ? (
            <Text variant="caption" style={styles.who}>
              {session.data.displayName} · {session.data.role}
            </Text>
          ) : null}
        </View>
        <View style={styles.main} role="main">
          {children}
        </View>
      </View>
    );
  }
  return (
    <View style={styles.phoneRoot}>
      <View style={styles.topBar} role="banner">
        <Text style={styles.brand}>Plotbank</Text>
        {session.data ? <Text variant="caption">{session.data.displayName}</Text> : null}
      </View>
      <View style={styles.main} role="main">
        {children}
      </View>
      <ScrollView horizontal contentContainerStyle={styles.tabBarInner} style={styles.tabBar} role="navigation" accessibilityLabel="Main">
        {items.map((item) => (
          <NavLink key={item.href} item={item} active={item.match(pathname)} compact />
        ))}
      </ScrollView>
    </View>
  );
}

const styles = StyleSheet.create({
  wideRoot: { flex: 1, flexDirection: "row", backgroundColor: colors.paper },
  side: { width: 232, borderRightWidth: 1, borderRightColor: colors.line, padding: space.lg, gap: space.xs, backgroundColor: colors.card },
  brandBox: { paddingVertical: space.sm, marginBottom: space.md },
  brand: { fontFamily: fonts.bold, fontSize: 20, color: colors.fieldDark },
  who: { marginTop: space.lg },
  sideLink: { minHeight: minTap, justifyContent: "center", paddingHorizontal: space.md, borderRadius: 8 },
  sideLinkActive: { backgroundColor: colors.fieldTint },
  main: { flex: 1, minWidth: 0 },
  phoneRoot: { flex: 1, backgroundColor: colors.paper },
  topBar: {
    height: 52,
    flexDirection: "row",
    alignItems: "center",
    justifyContent: "space-between",
    paddingHorizontal: space.lg,
    backgroundColor: colors.card,
    borderBottomWidth: 1,
    borderBottomColor: colors.line,
  },
  tabBar: { flexGrow: 0, backgroundColor: colors.card, borderTopWidth: 1, borderTopColor: colors.line },
  tabBarInner: { flexGrow: 1, justifyContent: "space-around" },
  tab: { minHeight: 56, minWidth: 72, paddingHorizontal: space.sm, alignItems: "center", justifyContent: "center" },
  tabActive: { borderTopWidth: 3, borderTopColor: colors.field },
  navText: { fontFamily: fonts.medium, fontSize: 14, color: colors.muted },
  navTextActive: { color: colors.fieldDark, fontFamily: fonts.semibold },
});
