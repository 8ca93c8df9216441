import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, space } from '../../constants/theme';
import { useCohorts, useCreateCohort } from '../../hooks/cohorts';
import { useSession } from '../../hooks/session';
import { isStaff } from '../lib/roles';
import { Button } from '../Button';
import { NameField } from '../fields';
import { formatCount, formatInteractions } from '../format';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { describeError, Empty, ErrorState, fieldError, Loading, Notice } from '../States';
import { Txt } from '../Txt';
import { bytesText } from '../../shared/api/quotaWords';
import { nameProblem } from '../../shared/spec';

/** The cohorts an instructor runs (all of them, for an admin), and a new one. */
export function CohortsView() {
  const cohorts = useCohorts();
  const create = useCreateCohort();
  const [name, setName] = useState('');
  const staff = isStaff(useSession().data);
  return (
    <Screen title="Cohorts" subtitle="Your classes: who is enrolled, what they may spend, what they start from.">
      {staff ? (
        <Panel title="New cohort" note="It starts with the default student quota; change it on the cohort's page.">
          <View style={styles.inline}>
            <View style={{ flex: 1, minWidth: 220 }}>
              <NameField label="Name" value={name} onChange={setName} placeholder="e.g. Galactic dynamics, spring (invented)" error={fieldError(create.error, 'name')} testID="cohort-name" />
            </View>
            <Button label="Create" disabled={!name.trim() || Boolean(nameProblem(name))} busy={create.isPending} onPress={() => create.mutate({ name: name.trim() }, { onSuccess: () => setName('') })} />
          </View>
          {create.isError && !fieldError(create.error, 'name') ? <Notice tone="danger">{describeError(create.error)}</Notice> : null}
        </Panel>
      ) : null}
      {cohorts.isPending ? (
        <Loading what="Loading cohorts" />
      ) : cohorts.isError ? (
        <ErrorState error={cohorts.error} title="Could not load cohorts" onRetry={() => cohorts.refetch()} />
      ) : cohorts.data.length === 0 ? (
        <Empty title="No cohorts yet" hint="Create one above, then share its enrolment code with your students." />
      ) : (
        <View role="list" style={{ gap: space.md }}>
          {cohorts.data.map((c) => (
            <View key={c.id} role="listitem" style={styles.card}>
              <View style={{ flex: 1, gap: 4 }}>
                <Txt variant="heading">{c.name}</Txt>
                <Txt variant="caption">
                  {c.memberCount} students · {c.instructor.name}
                  {c.enrolmentCode ? ` · code ${c.enrolmentCode}` : ''}
                </Txt>
                <Txt variant="caption">
                  Quota: {formatCount(c.quota.maxParticles)} particles, {formatCount(c.quota.maxSteps)} steps, {c.quota.maxConcurrentRuns} at a time, {formatInteractions(c.quota.dailyInteractions)} interactions a day; tables up to {bytesText(c.quota.maxUploadBytes)} and {formatCount(c.quota.maxUploadRows)} rows
                </Txt>
              </View>
              <Button small label="Open" href={{ pathname: '/cohorts/[id]', params: { id: String(c.id) } }} accessibilityLabel={`Open cohort ${c.name}`} />
            </View>
          ))}
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  inline: { flexDirection: 'row', alignItems: 'flex-end', gap: space.md, flexWrap: 'wrap' },
  card: { flexDirection: 'row', alignItems: 'center', gap: space.md, padding: space.md, borderWidth: 1, borderColor: colors.border, borderRadius: 10, backgroundColor: colors.surface, flexWrap: 'wrap' },
});
