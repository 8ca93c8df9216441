import { lawName, modelName } from '../../shared/engine';
import { useState } from 'react';
import { StyleSheet, TextInput, View, useWindowDimensions } from 'react-native';
import { colors, fonts, radius, space, WIDE_BREAKPOINT } from '../../constants/theme';
import { useCohort, useCohortMembers, useCohortTemplates, useInvite, useNewEnrolmentCode, usePublishFromRun, useSetCohortQuota } from '../../hooks/cohorts';
import { useRuns } from '../../hooks/runs';
import { useSession } from '../../hooks/session';
import { Button } from '../Button';
import { ChoiceChips, NameField, TextField } from '../fields';
import { formatAge, formatInteractions } from '../format';
import { Panel } from '../Panel';
import { ProgressBar, RunCard } from '../RunCard';
import { Screen } from '../Screen';
import { describeError, Empty, ErrorState, fieldError, Loading, Notice } from '../States';
import { nameProblem } from '../../shared/spec';
import { Txt } from '../Txt';
import { QuotaEditor } from './QuotaEditor';

function Members({ id }: { id: number }) {
  const members = useCohortMembers(id, true);
  if (members.isPending) return <Loading what="Loading students" />;
  if (members.isError) return <ErrorState error={members.error} title="Could not load students" onRetry={() => members.refetch()} />;
  if (members.data.length === 0) return <Empty title="Nobody enrolled yet" hint="Share the enrolment code, or invite by e-mail." />;
  return (
    <View role="list" style={{ gap: space.sm }}>
      {members.data.map((m) => (
        <View key={m.user.id} role="listitem" style={styles.member} accessibilityLabel={`${m.user.name}: ${formatInteractions(m.usage.used.interactionsToday)} interactions today, ${m.usage.used.activeRuns} runs active`}>
          <View style={styles.memberHead}>
            <Txt variant="body">{m.user.name}</Txt>
            <Txt variant="caption">
              {m.usage.used.activeRuns} active · {formatInteractions(m.usage.used.interactionsToday)} / {formatInteractions(m.usage.limits.dailyInteractions)} today · joined {formatAge(m.joinedAt)}
            </Txt>
          </View>
          <ProgressBar value={m.usage.used.interactionsToday / Math.max(1, m.usage.limits.dailyInteractions)} label={`${m.user.name} daily budget used`} />
        </View>
      ))}
    </View>
  );
}

function Invite({ id }: { id: number }) {
  const invite = useInvite(id);
  const [text, setText] = useState('');
  const emails = text.split(/[\s,;]+/).filter(Boolean);
  return (
    <View style={{ gap: space.sm }}>
      <TextInput multiline value={text} onChangeText={setText} placeholder="one or more e-mail addresses" placeholderTextColor={colors.textFaint} accessibilityLabel="E-mail addresses to invite" style={styles.textarea} />
      {invite.isError ? <Notice tone="danger">{describeError(invite.error)}</Notice> : null}
      {invite.data ? <Notice tone="ok">{`Sent ${invite.data.sent} invitation${invite.data.sent === 1 ? '' : 's'}.`}</Notice> : null}
      <Button small label={`Send ${emails.length || ''} invitation${emails.length === 1 ? '' : 's'}`} disabled={!emails.length} busy={invite.isPending} onPress={() => invite.mutate(emails, { onSuccess: () => setText('') })} style={{ alignSelf: 'flex-start' }} />
    </View>
  );
}

function Templates({ id }: { id: number }) {
  const templates = useCohortTemplates(id);
  const mine = useRuns({ status: 'finished' });
  const publish = usePublishFromRun(id);
  const [runId, setRunId] = useState('');
  const [name, setName] = useState('');
  const [description, setDescription] = useState('');
  const source = mine.data?.find((r) => r.id === runId);
  return (
    <View style={{ gap: space.md }}>
      {templates.isPending ? (
        <Loading what="Loading templates" />
      ) : templates.isError ? (
        <ErrorState error={templates.error} title="Could not load templates" onRetry={() => templates.refetch()} />
      ) : templates.data.length === 0 ? (
        <Txt variant="small">No templates yet.</Txt>
      ) : (
        templates.data.map((t) => (
          <View key={t.id} style={styles.row}>
            <View style={{ flex: 1 }}>
              <Txt variant="body">{t.name}</Txt>
              <Txt variant="caption">
                {modelName(t.modelKind)} · {lawName(t.lawKind)}
                {t.pairLawKind ? ` vs ${lawName(t.pairLawKind)}` : ''}
              </Txt>
            </View>
            <Button small tone="secondary" label="Try it" href={{ pathname: '/runs/new', params: { template: String(t.id) } }} />
          </View>
        ))
      )}
      <Txt variant="label">Publish one of your finished runs as a template</Txt>
      {mine.data && mine.data.length ? (
        <>
          <ChoiceChips compact value={runId} onChange={setRunId} choices={mine.data.slice(0, 12).map((r) => ({ value: r.id, label: r.name }))} />
          <NameField label="Template name" value={name} onChange={setName} placeholder={source?.name ?? 'e.g. Disk under halo vs MOND'} hint="Left empty, the run's name." error={fieldError(publish.error, 'name')} testID="template-name" />
          <TextField label="What students should look at" value={description} onChange={setDescription} placeholder="optional" />
          {publish.isError && !fieldError(publish.error, 'name') ? <Notice tone="danger">{describeError(publish.error)}</Notice> : null}
          {publish.isSuccess ? <Notice tone="ok">Published.</Notice> : null}
          <Button
            small
            label="Publish template"
            disabled={!runId || !(name.trim() || source?.name) || Boolean(nameProblem(name))}
            busy={publish.isPending}
            onPress={() => publish.mutate({ runId, name: name.trim() || source!.name, description: description.trim() })}
            style={{ alignSelf: 'flex-start' }}
          />
        </>
      ) : (
        <Txt variant="small">Finish a run first; its spec (and its pair's second law) becomes the template.</Txt>
      )}
    </View>
  );
}

/** One cohort: its code, quota, students and their usage, invitations, templates, and runs. */
export function CohortDetail({ id }: { id: number }) {
  const cohort = useCohort(id);
  const session = useSession();
  const setQuota = useSetCohortQuota(id);
  const newCode = useNewEnrolmentCode(id);
  const runs = useRuns({ cohort: id });
  const { width } = useWindowDimensions();
  const wide = width >= WIDE_BREAKPOINT;
  if (cohort.isPending) return <Loading what="Loading cohort" />;
  if (cohort.isError)
    return (
      <Screen title="Cohort">
        <ErrorState error={cohort.error} title="Could not load this cohort" onRetry={() => cohort.refetch()} />
      </Screen>
    );
  const c = cohort.data;
  const manages = session.data?.role === 'admin' || c.instructor.id === session.data?.id;
  const left = (
    <View style={styles.column}>
      <Panel title="Enrolment code" note="Students type it on their account page to join.">
        <Txt style={styles.code} selectable accessibilityLabel={`Enrolment code ${c.enrolmentCode ?? 'hidden'}`} testID="enrolment-code">
          {c.enrolmentCode ?? '—'}
        </Txt>
        {manages ? <Button small tone="secondary" label="Issue a new code" busy={newCode.isPending} onPress={() => newCode.mutate(undefined)} accessibilityHint="The old code stops working" style={{ alignSelf: 'flex-start' }} /> : null}
      </Panel>
      <Panel title="Quota for each student">
        <QuotaEditor key={JSON.stringify(c.quota)} value={c.quota} onSave={(q) => setQuota.mutate(q as typeof c.quota)} saving={setQuota.isPending} error={setQuota.error} />
      </Panel>
      <Panel title="Invite by e-mail">
        <Invite id={id} />
      </Panel>
      <Panel title="Templates">
        <Templates id={id} />
      </Panel>
    </View>
  );
  const right = (
    <View style={styles.column}>
      <Panel title={`Students (${c.memberCount})`} note="Today's use of the daily budget.">
        <Members id={id} />
      </Panel>
      <Panel title="Students' runs">
        {runs.isPending ? (
          <Loading what="Loading runs" />
        ) : runs.isError ? (
          <ErrorState error={runs.error} title="Could not load runs" onRetry={() => runs.refetch()} />
        ) : runs.data.length === 0 ? (
          <Txt variant="small">No runs in this cohort yet.</Txt>
        ) : (
          runs.data.map((r) => <RunCard key={r.id} run={r} showOwner />)
        )}
      </Panel>
    </View>
  );
  return (
    <Screen title={c.name} subtitle={`Instructor ${c.instructor.name} · ${c.memberCount} students`}>
      {wide ? (
        <View style={styles.columns}>
          <View style={{ flex: 1 }}>{left}</View>
          <View style={{ flex: 1 }}>{right}</View>
        </View>
      ) : (
        <>
          {left}
          {right}
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  columns: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  column: { gap: space.lg },
  member: { gap: 6, paddingVertical: space.xs },
  memberHead: { flexDirection: 'row', justifyContent: 'space-between', gap: space.sm, flexWrap: 'wrap' },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.md, paddingVertical: space.xs, borderBottomWidth: 1, borderBottomColor: colors.border },
  code: { fontFamily: fonts.monoMedium, fontSize: 28, letterSpacing: 3, color: colors.accent },
  textarea: { minHeight: 80, color: colors.text, fontFamily: fonts.mono, fontSize: 13, padding: space.md, backgroundColor: colors.surfaceRaised, borderRadius: radius.md, borderWidth: 1, borderColor: colors.border, textAlignVertical: 'top' },
});
