import { Link, usePathname, useRouter, type Href } from 'expo-router';
import type { ReactNode } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { SafeAreaView } from 'react-native-safe-area-context';
import { space, touchTarget } from '@/constants/theme';
import { useSession } from '@/hooks/session';
import { useSignOut } from '@/offline/use-offline';
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
  const signOut = useSignOut(endSession);
  const router = useRouter();
  const password = (
    <Button testID="password-open" label="Password" kind="inverse" onPress={() => router.push('/password')} />
  );
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
      <ThemedText variant="caption" style={{ color: wide ? colors.onPrimary : colors.textMuted }} testID="shell-user">
        {user?.name} · {membership?.siteName}
      </ThemedText>
      {password}
      <Button testID="sign-out" label="Sign out" kind="inverse" onPress={() => void signOut()} />
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
        <View style={styles.topActions}>
          {password}
          <Button testID="sign-out" label="Sign out" kind="inverse" onPress={() => void signOut()} />
        </View>
      </View>
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
  topActions: { flexDirection: 'row', gap: space.sm },
  content: { padding: space.lg, gap: space.lg, maxWidth: 1100, width: '100%' },
});
