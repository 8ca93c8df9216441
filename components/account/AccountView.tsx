import { lawName, modelName } from '../../shared/engine';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, fonts, radius, space } from '../../constants/theme';
import { API_BASE } from '../lib/api';
import { useAccountSettings, useCreateToken, useRevokeToken, useTokens, useUpdateAccount, useUsage } from '../../hooks/account';
import { useCohorts, useJoinCohort, useTemplates } from '../../hooks/cohorts';
import { useSession } from '../../hooks/session';
import { Button } from '../Button';
import { ChoiceChips, NameField, TextField, Toggle } from '../fields';
import { formatAge, formatCount, formatExpiry, formatInteractions } from '../format';
import { Panel } from '../Panel';
import { ProgressBar } from '../RunCard';
import { Screen } from '../Screen';
import { describeError, Empty, ErrorState, fieldError, Loading, Notice } from '../States';
import { nameProblem } from '../../shared/spec';
import { Txt } from '../Txt';
import { Fact } from '../run/RunFacts';
import { DEFAULT_TOKEN_LIFETIME_DAYS, TOKEN_LIFETIME_CHOICES_DAYS } from '../../shared/api/accounts';
import { bytesText } from '../../shared/api/quotaWords';

function UsagePanel() {
  const usage = useUsage();
  return (
    <Panel title="Budget and limits" note="Compute is counted in pair interactions, per UTC day; the limits come from your role, cohort and any allocation.">
      {usage.isPending ? (
        <Loading what="Loading your budget" />
      ) : usage.isError ? (
        <ErrorState error={usage.error} title="Could not load your budget" onRetry={() => usage.refetch()} />
      ) : (
        <>
          <ProgressBar value={usage.data.used.interactionsToday / Math.max(1, usage.data.limits.dailyInteractions)} label="Daily compute used" />
          <View style={styles.facts}>
            <Fact label="used today" value={formatInteractions(usage.data.used.interactionsToday)} />
            <Fact label="left today" value={formatInteractions(usage.data.remaining.interactionsToday)} />
            <Fact label="runs active" value={`${usage.data.used.activeRuns} / ${usage.data.limits.maxConcurrentRuns}`} />
            <Fact label="max particles" value={formatCount(usage.data.limits.maxParticles)} />
            <Fact label="max steps" value={formatCount(usage.data.limits.maxSteps)} />
            <Fact label="largest table file" value={bytesText(usage.data.limits.maxUploadBytes)} />
            <Fact label="rows per table" value={formatCount(usage.data.limits.maxUploadRows)} />
          </View>
          <Txt variant="caption">Resets {new Date(usage.data.resetsAt).toUTCString()}.</Txt>
        </>
      )}
    </Panel>
  );
}

function NotificationsPanel() {
  const settings = useAccountSettings();
  const update = useUpdateAccount();
  return (
    <Panel title="Notifications">
      {settings.isPending ? (
        <Loading what="Loading settings" />
      ) : settings.isError ? (
        <ErrorState error={settings.error} title="Could not load settings" onRetry={() => settings.refetch()} />
      ) : (
        <>
          <Toggle
            label="E-mail me when a run ends"
            value={update.isPending ? Boolean(update.variables?.notifyOnFinish) : settings.data.notifyOnFinish}
            onChange={(v) => update.mutate({ notifyOnFinish: v })}
            hint={settings.data.user.email ? `Sent to ${settings.data.user.email}, for finished, failed and stopped runs.` : 'Your sign-in gave no e-mail address, so there is nowhere to send it.'}
          />
          {update.isError ? <Notice tone="danger">{describeError(update.error)}</Notice> : null}
        </>
      )}
    </Panel>
  );
}

function TokensPanel() {
  const tokens = useTokens();
  const create = useCreateToken();
  const revoke = useRevokeToken();
  const [name, setName] = useState('');
  const [lifetime, setLifetime] = useState<number>(DEFAULT_TOKEN_LIFETIME_DAYS);
  const [armed, setArmed] = useState<number | null>(null);
  const origin = API_BASE || (typeof window !== 'undefined' ? window.location.origin : '');
  return (
    <Panel title="Personal API tokens" note="For scripts: send “Authorization: Bearer <token>”. A token acts as you, within your quota.">
      <View style={styles.inline}>
        <View style={{ flex: 1, minWidth: 200 }}>
          <NameField label="New token name" value={name} onChange={setName} placeholder="e.g. laptop notebook" error={fieldError(create.error, 'name')} testID="token-name" />
        </View>
        <Button label="Create token" disabled={!name.trim() || Boolean(nameProblem(name))} busy={create.isPending} onPress={() => create.mutate({ name: name.trim(), expiresInDays: lifetime }, { onSuccess: () => setName('') })} />
      </View>
      <ChoiceChips label="Valid for" value={lifetime} onChange={setLifetime} compact choices={TOKEN_LIFETIME_CHOICES_DAYS.map((d) => ({ value: d, label: d === 365 ? '1 year' : `${d} days`, note: 'After this the token stops working; make a new one then.' }))} />
      {create.isError && !fieldError(create.error, 'name') ? <Notice tone="danger">{describeError(create.error)}</Notice> : null}
      {create.data ? (
        <Notice tone="ok">
          <Txt variant="small" color={colors.text}>
            Copy this token now; it is not shown again.
          </Txt>
          <Txt selectable style={styles.secret} accessibilityLabel="New token secret" testID="token-secret">
            {create.data.secret}
          </Txt>
          <Txt selectable style={styles.code}>
            {`curl -H "Authorization: Bearer ${create.data.secret}" ${origin}/api/runs`}
          </Txt>
        </Notice>
      ) : null}
      {tokens.isPending ? (
        <Loading what="Loading tokens" />
      ) : tokens.isError ? (
        <ErrorState error={tokens.error} title="Could not load tokens" onRetry={() => tokens.refetch()} />
      ) : tokens.data.length === 0 ? (
        <Empty title="No tokens" hint="Create one to submit runs from a script." />
      ) : (
        <View role="list" style={styles.list}>
          {tokens.data.map((t) => (
            <View key={t.id} role="listitem" style={styles.row} accessibilityLabel={`Token ${t.name}`}>
              <View style={{ flex: 1, gap: 2 }}>
                <Txt variant="body">{t.name}</Txt>
                <Txt variant="caption">
                  <Txt style={styles.mono}>{t.prefix}…</Txt> · created {formatAge(t.createdAt)} · {t.lastUsedAt ? `last used ${formatAge(t.lastUsedAt)}` : 'never used'} · {formatExpiry(t.expiresAt)}
                </Txt>
              </View>
              <Button small tone="danger" label={armed === t.id ? 'Tap again to revoke' : 'Revoke'} busy={revoke.isPending && revoke.variables === t.id} onPress={() => (armed === t.id ? revoke.mutate(t.id) : setArmed(t.id))} accessibilityLabel={`Revoke token ${t.name}`} />
            </View>
          ))}
        </View>
      )}
      {revoke.isError ? <Notice tone="danger">{describeError(revoke.error)}</Notice> : null}
    </Panel>
  );
}

function CohortsPanel({ student }: { student: boolean }) {
  const cohorts = useCohorts();
  const templates = useTemplates();
  const join = useJoinCohort();
  const [code, setCode] = useState('');
  return (
    <Panel title="Cohorts and templates">
      {student ? (
        <View style={styles.inline}>
          <View style={{ flex: 1, minWidth: 200 }}>
            <TextField label="Enrolment code" value={code} onChange={setCode} placeholder="ABCD-2345" hint="From your instructor." testID="enrolment-code" />
          </View>
          <Button label="Join" disabled={!code.trim()} busy={join.isPending} onPress={() => join.mutate(code, { onSuccess: () => setCode('') })} />
        </View>
      ) : null}
      {join.isError ? <Notice tone="danger">{describeError(join.error)}</Notice> : null}
      {join.data ? <Notice tone="ok">{`You joined ${join.data.cohort.name}.`}</Notice> : null}
      {cohorts.isPending ? (
        <Loading what="Loading cohorts" />
      ) : cohorts.isError ? (
        <ErrorState error={cohorts.error} title="Could not load cohorts" onRetry={() => cohorts.refetch()} />
      ) : cohorts.data.length === 0 ? (
        <Txt variant="small">You are in no cohort.</Txt>
      ) : (
        cohorts.data.map((c) => (
          <Txt key={c.id} variant="body">
            {c.name} <Txt variant="caption">· {c.instructor.name} · {c.memberCount} members</Txt>
          </Txt>
        ))
      )}
      <Txt variant="label">Templates to start from</Txt>
      {templates.isPending ? (
        <Loading what="Loading templates" />
      ) : templates.isError ? (
        <ErrorState error={templates.error} title="Could not load templates" onRetry={() => templates.refetch()} />
      ) : templates.data.length === 0 ? (
        <Txt variant="small">No templates shared with you yet.</Txt>
      ) : (
        <View role="list" style={styles.list}>
          {templates.data.map((t) => (
            <View key={t.id} role="listitem" style={styles.row}>
              <View style={{ flex: 1, gap: 2 }}>
                <Txt variant="body">{t.name}</Txt>
                <Txt variant="caption">
                  {modelName(t.modelKind)} · {lawName(t.lawKind)}
                  {t.pairLawKind ? ` vs ${lawName(t.pairLawKind)}` : ''} · {t.cohortName}
                </Txt>
                {t.description ? <Txt variant="caption">{t.description}</Txt> : null}
              </View>
              <Button small label="Use" href={{ pathname: '/runs/new', params: { template: String(t.id) } }} accessibilityLabel={`Start a run from template ${t.name}`} />
            </View>
          ))}
        </View>
      )}
    </Panel>
  );
}

/** Who you are, your budget, notifications, API tokens, cohorts. */
export function AccountView() {
  const session = useSession();
  const user = session.data;
  if (!user) return <Loading what="Loading your account" />;
  return (
    <Screen title="Account" subtitle={`${user.name} (${user.login}) · ${user.role}${user.email ? ` · ${user.email}` : ''}`}>
      <UsagePanel />
      <NotificationsPanel />
      <CohortsPanel student={user.role === 'student'} />
      <TokensPanel />
    </Screen>
  );
}

const styles = StyleSheet.create({
  facts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  inline: { flexDirection: 'row', alignItems: 'flex-end', gap: space.md, flexWrap: 'wrap' },
  list: { gap: space.xs },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.md, paddingVertical: space.sm, borderBottomWidth: 1, borderBottomColor: colors.border, flexWrap: 'wrap' },
  mono: { fontFamily: fonts.mono },
  secret: { fontFamily: fonts.monoMedium, fontSize: 14, color: colors.text, backgroundColor: colors.background, padding: space.sm, borderRadius: radius.sm },
  code: { fontFamily: fonts.mono, fontSize: 12, color: colors.textMuted },
});
