import { useState } from 'react';
import { Pressable, StyleSheet, View, useWindowDimensions } from 'react-native';
import { LIMIT_CEILINGS, ROLES, type AdminUser, type Role } from '../../shared/api/accounts';
import { bytesText } from '../../shared/api/quotaWords';
import { colors, radius, space, WIDE_BREAKPOINT } from '../../constants/theme';
import { useAdminUser, useAdminUsers, useGrantRole, useSetAllocation } from '../../hooks/admin';
import { ChoiceChips, TextField } from '../fields';
import { formatAge, formatCount, formatInteractions } from '../format';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { describeError, Empty, ErrorState, Loading, Notice } from '../States';
import { Txt } from '../Txt';
import { QuotaEditor } from '../cohorts/QuotaEditor';
import { Fact } from '../run/RunFacts';

const ANY = 'any';

function UserDetail({ user }: { user: AdminUser }) {
  const detail = useAdminUser(user.id);
  const grant = useGrantRole(user.id);
  const allocate = useSetAllocation(user.id);
  const current = detail.data?.user ?? user;
  return (
    <Panel title={current.name} note={`${current.login} · ${current.email ?? 'no e-mail'} · joined ${formatAge(current.createdAt)}${current.lastSignInAt ? ` · last signed in ${formatAge(current.lastSignInAt)}` : ''}`}>
      <ChoiceChips label="Role" value={current.role} onChange={(r) => grant.mutate(r as Role)} choices={ROLES.map((r) => ({ value: r, label: r }))} />
      {grant.isError ? <Notice tone="danger">{describeError(grant.error)}</Notice> : null}
      <Txt variant="label">Limits in force</Txt>
      <View style={styles.facts}>
        <Fact label="particles" value={formatCount(current.limits.maxParticles)} />
        <Fact label="steps" value={formatCount(current.limits.maxSteps)} />
        <Fact label="runs at a time" value={String(current.limits.maxConcurrentRuns)} />
        <Fact label="daily compute" value={formatInteractions(current.limits.dailyInteractions)} />
        <Fact label="largest table file" value={bytesText(current.limits.maxUploadBytes)} />
        <Fact label="rows per table" value={formatCount(current.limits.maxUploadRows)} />
        {detail.data ? <Fact label="used today" value={formatInteractions(detail.data.usage.used.interactionsToday)} /> : null}
      </View>
      <Txt variant="label">Allocation (overrides role and cohort limits)</Txt>
      <QuotaEditor key={`${current.id}-${JSON.stringify(current.allocation)}`} nullable ceiling={LIMIT_CEILINGS} value={current.allocation} onSave={(a) => allocate.mutate(a)} saving={allocate.isPending} error={allocate.error} saveLabel="Save allocation" />
    </Panel>
  );
}

/** People, their roles and their compute allocations. */
export function AdminView() {
  const [q, setQ] = useState('');
  const [role, setRole] = useState<Role | typeof ANY>(ANY);
  const [selected, setSelected] = useState<number | null>(null);
  const users = useAdminUsers(q, role === ANY ? undefined : role);
  const { width } = useWindowDimensions();
  const wide = width >= WIDE_BREAKPOINT;
  const chosen = users.data?.find((u) => u.id === selected) ?? null;

  const list = (
    <View style={styles.column}>
      <TextField label="Search people" value={q} onChange={setQ} placeholder="name or login" testID="admin-search" />
      <ChoiceChips compact label="Role" value={role} onChange={setRole} choices={[{ value: ANY, label: 'All' }, ...ROLES.map((r) => ({ value: r, label: r }))]} />
      {users.isPending ? (
        <Loading what="Loading people" />
      ) : users.isError ? (
        <ErrorState error={users.error} title="Could not load people" onRetry={() => users.refetch()} />
      ) : users.data.length === 0 ? (
        <Empty title="Nobody matches" hint="Try another name or role." />
      ) : (
        <View role="list" style={{ gap: space.xs }}>
          {users.data.map((u) => (
            <Pressable key={u.id} role="button" accessibilityLabel={`${u.name}, ${u.role}`} aria-pressed={u.id === selected} onPress={() => setSelected(u.id)} style={[styles.user, u.id === selected && styles.userOn]}>
              <Txt variant="body">{u.name}</Txt>
              <Txt variant="caption">
                {u.login} · {u.role} · {formatInteractions(u.limits.dailyInteractions)}/day
              </Txt>
            </Pressable>
          ))}
        </View>
      )}
    </View>
  );
  const detail = chosen ? <UserDetail user={chosen} /> : <Empty title="Pick someone" hint="Their role, limits and allocation appear here." />;
  return (
    <Screen title="Admin" subtitle="Grant roles and compute allocations.">
      {wide ? (
        <View style={styles.columns}>
          <View style={{ flex: 2 }}>{list}</View>
          <View style={{ flex: 3 }}>{detail}</View>
        </View>
      ) : (
        <>
          {detail}
          {list}
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  columns: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  column: { gap: space.md },
  facts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  user: { padding: space.md, borderRadius: radius.md, borderWidth: 1, borderColor: colors.border, backgroundColor: colors.surface, gap: 2 },
  userOn: { borderColor: colors.accent },
});
