import { Link, usePathname, useRouter, type Href } from 'expo-router';
import { useState, type ReactNode } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { SafeAreaView } from 'react-native-safe-area-context';
import { space, touchTarget } from '@/constants/theme';
import { useSession } from '@/hooks/session';
import { useSignOut, type SignOutCheck } from '@/offline/use-offline';
import { useTheme } from '@/hooks/use-theme';
import { useWide } from '@/hooks/use-wide';
import { Button } from './button';
import { ThemedText } from './themed-text';

export interface NavItem {
  href: Extract<Href, string>;
  label: string;
  testID: string;
}

/**
 * The frame around every signed-in screen. On a phone: a top bar and a bar of places at the
 * bottom. From the wide breakpoint: the places stand in a column beside the content.
 */
export function AppShell({ nav, title, children }: { nav: NavItem[]; title: string; children: ReactNode }) {
  const { colors } = useTheme();
  const wide = useWide();
  const pathname = usePathname();
  const { user, membership, signOut: endSession } = useSession();
  const { prepare, signOut } = useSignOut(endSession);
  const router = useRouter();
  // Sign-out sits behind the account menu and asks first: offline, signing in again is not possible.
  const [menuOpen, setMenuOpen] = useState(false);
  const [confirm, setConfirm] = useState<SignOutCheck | 'checking' | null>(null);
  const closeMenu = () => {
    setMenuOpen(false);
    setConfirm(null);
  };
  const askSignOut = async () => {
    setConfirm('checking');
    setConfirm(await prepare().catch(() => ({ online: false, unsent: 0 })));
  };
  const menuButton = (
    <Button
      testID="account-menu"
      label={menuOpen ? 'Close' : 'Account'}
      kind="inverse"
      aria-expanded={menuOpen}
      onPress={() => (menuOpen ? closeMenu() : setMenuOpen(true))}
    />
  );
  const confirmPanel =
    confirm === null ? null : confirm === 'checking' ? (
      <ThemedText variant="label" testID="sign-out-checking" style={{ color: colors.text }}>
        Sending your records first…
      </ThemedText>
    ) : (
      <View style={styles.menuBlock} testID="sign-out-panel">
        <ThemedText variant="title">Sign out?</ThemedText>
        {!confirm.online ? (
          <ThemedText tone="danger" bold testID="sign-out-offline">
            No signal: signing in again needs signal. Until then nobody can record on this device.
          </ThemedText>
        ) : null}
        {confirm.unsent > 0 ? (
          <ThemedText tone="warning" bold testID="sign-out-unsent">
            {confirm.unsent === 1 ? '1 of your records is' : `${confirm.unsent} of your records are`} not sent. They
            stay on this device and are sent when you sign in here again.
          </ThemedText>
        ) : (
          <ThemedText testID="sign-out-all-sent">Everything you recorded is sent.</ThemedText>
        )}
        <View style={styles.menuRow}>
          <Button testID="sign-out-cancel" label="Stay signed in" kind="plain" onPress={closeMenu} />
          <Button testID="sign-out-confirm" label="Sign out" kind="danger" onPress={() => void signOut()} />
        </View>
      </View>
    );
  const menu = menuOpen ? (
    <View style={[styles.menu, { backgroundColor: colors.surface, borderColor: colors.rule }]} testID="account-panel">
      <ThemedText variant="label" testID="shell-user">
        {user?.name} · {membership?.siteName}
      </ThemedText>
      {confirm === null ? (
        <View style={styles.menuRow}>
          <Button testID="password-open" label="Password" kind="plain" onPress={() => router.push('/password')} />
          <Button testID="sign-out" label="Sign out…" kind="plain" onPress={() => void askSignOut()} />
        </View>
      ) : (
        confirmPanel
      )}
    </View>
  ) : null;
  // The group's title heads its home only; deeper screens carry their own heading.
  const heading =
    pathname === nav[0]?.href ? (
      <ThemedText variant="heading" accessibilityRole="header">
        {title}
      </ThemedText>
    ) : null;

  const places = nav.map((item) => {
    // A place is active on its own path and below it, unless a more specific place claims the path.
    const under = (href: string) => pathname === href || pathname.startsWith(href + '/');
    const active =
      under(item.href) &&
      !nav.some((o) => o.href.length > item.href.length && o.href.startsWith(item.href) && under(o.href));
    const edge = active ? colors.accent : colors.clear;
    return (
      <Link key={item.href} href={item.href} asChild>
        <Pressable
          testID={item.testID}
          accessibilityRole="link"
          aria-selected={active}
          // Link (asChild) hands the style on to an anchor on the web: give it one flat object.
          style={StyleSheet.flatten([wide ? styles.sideItem : styles.bottomItem, { borderColor: edge }])}
        >
          <ThemedText variant="label" bold={active} style={{ color: wide ? colors.onPrimary : colors.text }}>
            {item.label}
          </ThemedText>
        </Pressable>
      </Link>
    );
  });

  const account = (
    <View style={styles.account}>
      {menuButton}
      {menu}
    </View>
  );

  if (wide) {
    return (
      <View style={[styles.row, { backgroundColor: colors.background }]}>
        <View style={[styles.side, { backgroundColor: colors.primary }]} testID="nav-side">
          <ThemedText variant="title" style={{ color: colors.onPrimary }}>
            Trueround
          </ThemedText>
          <View style={styles.sideList}>{places}</View>
          {account}
        </View>
        <ScrollView style={styles.flex} contentContainerStyle={styles.content}>
          {heading}
          {children}
        </ScrollView>
      </View>
    );
  }
  return (
    <SafeAreaView style={[styles.flex, { backgroundColor: colors.background }]}>
      <View style={[styles.top, { backgroundColor: colors.primary }]}>
        <ThemedText variant="title" style={{ color: colors.onPrimary }}>
          Trueround
        </ThemedText>
        <View style={styles.topActions}>{menuButton}</View>
      </View>
      {menu}
      <ScrollView style={styles.flex} contentContainerStyle={styles.content}>
        {heading}
        {children}
      </ScrollView>
      {nav.length > 1 ? (
        <View
          style={[styles.bottom, { backgroundColor: colors.surface, borderColor: colors.rule }]}
          testID="nav-bottom"
        >
          {places}
        </View>
      ) : null}
    </SafeAreaView>
  );
}

const styles = StyleSheet.create({
  flex: { flex: 1 },
  row: { flex: 1, flexDirection: 'row' },
  side: { width: 240, padding: space.lg, gap: space.xl },
  sideList: { flex: 1, gap: space.xs },
  sideItem: { minHeight: touchTarget, justifyContent: 'center', paddingHorizontal: space.md, borderLeftWidth: 4 },
  bottom: { flexDirection: 'row', borderTopWidth: 1 },
  bottomItem: {
    flex: 1,
    minHeight: touchTarget + 8,
    alignItems: 'center',
    justifyContent: 'center',
    borderTopWidth: 4,
  },
  top: {
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    paddingHorizontal: space.lg,
    paddingVertical: space.sm,
  },
  account: { gap: space.sm },
  menu: { borderWidth: 1, padding: space.md, gap: space.sm },
  menuBlock: { gap: space.sm },
  menuRow: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' },
  topActions: { flexDirection: 'row', gap: space.sm },
  content: { padding: space.lg, gap: space.lg, maxWidth: 1100, width: '100%' },
});
