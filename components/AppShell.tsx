import type { ReactNode } from 'react';
import { Pressable, StyleSheet, View, useWindowDimensions } from 'react-native';
import { Link, usePathname, type Href } from 'expo-router';
import { colors, fonts, space } from '../constants/theme';
import { useSignOut, type SessionUser } from '../hooks/session';
import { isAdmin, isStaff } from './lib/roles';
import { Icon, Mark, type IconName } from './icons';
import { Txt } from './Txt';

interface NavItem {
  href: Href;
  label: string;
  icon: IconName;
  match: (path: string) => boolean;
}

function navFor(user: SessionUser): NavItem[] {
  const items: NavItem[] = [
    { href: '/', label: 'Runs', icon: 'runs', match: (p) => p === '/' || (p.startsWith('/runs/') && p !== '/runs/new') },
    { href: '/runs/new', label: 'Launch', icon: 'launch', match: (p) => p === '/runs/new' },
    { href: '/compare', label: 'Compare', icon: 'compare', match: (p) => p.startsWith('/compare') },
    { href: '/galaxies', label: 'Galaxies', icon: 'galaxy', match: (p) => p.startsWith('/galaxies') },
  ];
  if (isStaff(user)) items.push({ href: '/cohorts', label: 'Cohorts', icon: 'cohort', match: (p) => p.startsWith('/cohorts') });
  if (isAdmin(user)) items.push({ href: '/admin', label: 'Admin', icon: 'admin', match: (p) => p.startsWith('/admin') });
  items.push({ href: '/account', label: 'Account', icon: 'account', match: (p) => p.startsWith('/account') });
  return items;
}

/** The frame around signed-in screens: a top bar, and the navigation on top (wide) or bottom (phones). */
export function AppShell({ user, children }: { user: SessionUser; children: ReactNode }) {
  const { width } = useWindowDimensions();
  const wide = width >= 768;
  const path = usePathname();
  const items = navFor(user);
  const signOut = useSignOut();

  // Children of <Link asChild> get their style merged as a plain object, so styles are flattened.
  const links = items.map((item) => {
    const on = item.match(path);
    return (
      <Link key={item.label} href={item.href} asChild>
        <Pressable role="link" accessibilityLabel={item.label} aria-current={on ? 'page' : undefined} style={StyleSheet.flatten([wide ? styles.topLink : styles.tab, on && (wide ? styles.topLinkOn : styles.tabOn)])}>
          <Icon name={item.icon} size={wide ? 18 : 22} color={on ? colors.accent : colors.textMuted} />
          <Txt style={wide ? styles.topLinkText : styles.tabText} color={on ? colors.text : colors.textMuted}>
            {item.label}
          </Txt>
        </Pressable>
      </Link>
    );
  });

  return (
    <View style={styles.root}>
      <View style={styles.bar} role="banner">
        <Link href="/" asChild>
          <Pressable role="link" accessibilityLabel="Infall, your runs" style={styles.brand}>
            <Mark />
            <Txt style={styles.word}>infall</Txt>
          </Pressable>
        </Link>
        {wide ? (
          <View style={styles.topNav} role="navigation" accessibilityLabel="Main">
            {links}
          </View>
        ) : null}
        <View style={styles.who}>
          <Txt variant="caption" numberOfLines={1} style={styles.whoText}>
            {user.name} · {user.role}
          </Txt>
          <Pressable role="button" accessibilityLabel="Sign out" onPress={() => signOut.mutate()} style={styles.signOut}>
            <Txt variant="caption" color={colors.link}>
              Sign out
            </Txt>
          </Pressable>
        </View>
      </View>
      <View style={styles.body}>{children}</View>
      {wide ? null : (
        <View style={styles.tabs} role="navigation" accessibilityLabel="Main">
          {links}
        </View>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  root: { flex: 1, backgroundColor: colors.background },
  bar: { flexDirection: 'row', alignItems: 'center', gap: space.lg, paddingHorizontal: space.lg, height: 56, borderBottomWidth: 1, borderBottomColor: colors.border, backgroundColor: colors.background },
  brand: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  word: { fontFamily: fonts.heading, fontSize: 20, letterSpacing: 2, color: colors.text },
  topNav: { flexDirection: 'row', gap: space.xs, flex: 1 },
  topLink: { flexDirection: 'row', alignItems: 'center', gap: 6, paddingHorizontal: space.md, height: 36, borderRadius: 8 },
  topLinkOn: { backgroundColor: colors.surfaceRaised },
  topLinkText: { fontFamily: fonts.bodySemi, fontSize: 14 },
  who: { marginLeft: 'auto', alignItems: 'flex-end', flexShrink: 1 },
  whoText: { maxWidth: 200 },
  signOut: { paddingVertical: 2 },
  body: { flex: 1 },
  tabs: { flexDirection: 'row', borderTopWidth: 1, borderTopColor: colors.border, backgroundColor: colors.surface, paddingBottom: 4 },
  tab: { flex: 1, alignItems: 'center', justifyContent: 'center', paddingTop: 8, paddingBottom: 4, gap: 2, minHeight: 56 },
  tabOn: { borderTopWidth: 2, borderTopColor: colors.accent, marginTop: -1 },
  tabText: { fontFamily: fonts.bodySemi, fontSize: 11 },
});
