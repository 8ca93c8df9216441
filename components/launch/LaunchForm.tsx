import { StyleSheet, View, useWindowDimensions } from 'react-native';
import { useRouter } from 'expo-router';
import type { LawSpec, RunSpecInput } from '../../shared/spec';
import { colors, space, WIDE_BREAKPOINT } from '../../constants/theme';
import { ApiError } from '../lib/api';
import { useRunDraft } from '../../hooks/runDraft';
import { defaultPairLaw, modelModule } from '../../shared/engine';
import { useSubmitRun } from '../../hooks/runs';
import { useUsage } from '../../hooks/account';
import { Button } from '../Button';
import { ChoiceChips, FieldRow, NameField, Toggle } from '../fields';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { describeError, Notice } from '../States';
import { Txt } from '../Txt';
import { INTEGRATOR_NOTES, SOLVER_LABELS } from '../spec/labels';
import { CostPanel, quotaFieldNotes } from './CostPanel';
import { LawEditor } from './LawEditor';
import { ModelEditor } from './ModelEditor';
import { enumOptions, nodeAt, titleOf } from './schemaForm';
import { ChecksPreview, CurvePreview } from './PreviewPanels';
import { QuotaLimitHints, SpecNumber } from './SpecField';


export interface LaunchStart {
  spec: RunSpecInput;
  pairLaw?: LawSpec | null;
  name?: string;
  /** Where the starting point came from, shown under the title. */
  origin: string;
}

/** A two-body orbit has no mass model to preview; a kind no module has is left to the schema's message. */
function isOrbit(model: unknown): boolean {
  try {
    return Boolean(modelModule(String((model as { kind?: unknown } | undefined)?.kind)).orbit);
  } catch {
    return false;
  }
}

/** The new-run form with its live preview, checks and cost; `start` comes from a clone or a template. */
export function LaunchForm({ start }: { start?: LaunchStart }) {
  const router = useRouter();
  const form = useRunDraft(start?.spec, start?.pairLaw, start?.name);
  const submit = useSubmitRun();
  const { width } = useWindowDimensions();
  const wide = width >= WIDE_BREAKPOINT;
  const usage = useUsage();
  const { draft, set } = form;
  // Fields that break the person's quota are marked too; only schema problems block launching.
  const quota = quotaFieldNotes(draft, form.cost, usage.data);
  const issues = { ...quota.marks, ...form.issues };
  const law = draft.law as LawSpec;
  const solver = draft.solver as { kind: string; theta?: number };

  const onSubmit = () => {
    const body = form.submission();
    if (!body) return;
    submit.mutate(body, {
      onSuccess: (runs) => {
        if (runs.length > 1 && runs[0].pairId) router.replace({ pathname: '/compare', params: { pair: runs[0].pairId } });
        else router.replace({ pathname: '/runs/[id]', params: { id: runs[0].id } });
      },
      onError: (e) => {
        if (e instanceof ApiError) form.showServerIssue(e.field, e.message);
      },
    });
  };

  const submitError = submit.error ? describeError(submit.error) : null;
  // Named, because on a phone the marked field may be a long way above the button.
  const problemNames = [
    ...new Set(
      Object.keys(form.issues).map((k) => {
        if (k === 'pairLaw') return 'Second law';
        // The pair's second law is checked as the law of a spec: its fields sit at law.*.
        const path = k.split('.');
        const where = path[0] === 'pairLaw' ? nodeAt(['law', ...path.slice(1)], { law: form.pairLaw }) : nodeAt(path, draft);
        return titleOf(path[path.length - 1], where?.node ?? {});
      }),
    ),
  ];
  const problems = problemNames.length;

  const formColumn = (
    <View style={styles.column}>
      <Panel title="Name">
        <NameField label="Run name (optional)" value={form.name} onChange={form.setName} placeholder="e.g. disk, halo vs MOND" hint="Left empty, the name says the model and law." error={issues.name} testID="field-name" />
      </Panel>
      <Panel title="Initial conditions">
        <ModelEditor draft={draft} set={set} issues={issues} pairLaw={form.pairLaw} />
      </Panel>
      <Panel title="Force law">
        <LawEditor label="Law" law={law} onChange={(l) => set(['law'], l)} issues={issues} issuePrefix="law." exclude={form.pairLaw?.kind} testID="law-first" />
        <Toggle
          label="Run as a pair under a second law"
          value={Boolean(form.pairLaw)}
          onChange={(on) => form.setPairLaw(on ? defaultPairLaw(law.kind) : null)}
          hint="Same initial particles, same seed, two laws: the compare page shows them side by side."
        />
        {form.pairLaw ? (
          <View style={styles.pair}>
            <LawEditor label="Second law" law={form.pairLaw} onChange={form.setPairLaw} issues={issues} issuePrefix="pairLaw." exclude={law.kind} testID="law-second" />
            {issues.pairLaw ? <Notice tone="danger">{issues.pairLaw}</Notice> : null}
          </View>
        ) : null}
      </Panel>
      <Panel title="Integration">
        <ChoiceChips
          label="Integrator"
          value={String(draft.integrator ?? 'leapfrog')}
          onChange={(v) => set(['integrator'], v)}
          choices={enumOptions(nodeAt(['integrator'], draft)?.node ?? {}).map(({ value, label }) => ({ value: String(value), label, note: INTEGRATOR_NOTES[value] }))}
        />
        <ChoiceChips
          label="Force solver"
          value={solver.kind}
          onChange={(k) => set(['solver'], k === 'tree' ? { kind: 'tree', theta: 0.6 } : { kind: 'direct' })}
          choices={Object.entries(SOLVER_LABELS).map(([value, { label, note }]) => ({ value, label, note }))}
        />
        {solver.kind === 'tree' ? <FieldRow><SpecNumber draft={draft} path={['solver', 'theta']} onChange={set} issues={issues} /></FieldRow> : null}
        <FieldRow>
          <SpecNumber draft={draft} path={['timestep_Myr']} onChange={set} issues={issues} />
          <SpecNumber draft={draft} path={['duration_Myr']} onChange={set} issues={issues} />
          <SpecNumber draft={draft} path={['softening_kpc']} onChange={set} issues={issues} />
          <SpecNumber draft={draft} path={['snapshotEvery']} onChange={set} issues={issues} />
          <SpecNumber draft={draft} path={['diagnosticsEvery']} onChange={set} issues={issues} />
          <SpecNumber draft={draft} path={['seed']} onChange={set} issues={issues} />
        </FieldRow>
      </Panel>
    </View>
  );

  const sideColumn = (
    <View style={styles.column}>
      <CurvePreview preview={form.preview} isOrbit={isOrbit(draft.model)} />
      <ChecksPreview preview={form.preview} timestep={typeof draft.timestep_Myr === 'number' ? draft.timestep_Myr : undefined} onTimestep={(dt) => set(['timestep_Myr'], dt)} />
      <CostPanel cost={form.cost} />
      <View style={styles.submit}>
        {problems ? (
          <Txt variant="small" color={colors.danger} accessibilityLiveRegion="polite">
            {`${problems === 1 ? '1 field needs' : `${problems} fields need`} attention: ${problemNames.join(', ')}.`}
          </Txt>
        ) : null}
        {submitError ? <Notice tone="danger">{submitError}</Notice> : null}
        <Button label={form.pairLaw ? 'Launch the pair' : 'Launch run'} onPress={onSubmit} disabled={!form.valid} busy={submit.isPending} testID="launch" />
      </View>
    </View>
  );

  return (
    <QuotaLimitHints.Provider value={quota.hints}>
      <Screen title="Launch a run" subtitle={start?.origin ?? 'Choose the initial conditions, the force law (or two), and how to integrate. Everything is checked against the same schema the server uses.'}>
        {wide ? (
          <View style={styles.columns}>
            <View style={{ flex: 6 }}>{formColumn}</View>
            <View style={{ flex: 5 }}>{sideColumn}</View>
          </View>
        ) : (
          <>
            {formColumn}
            {sideColumn}
          </>
        )}
      </Screen>
    </QuotaLimitHints.Provider>
  );
}

const styles = StyleSheet.create({
  columns: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  column: { gap: space.lg },
  pair: { gap: space.md, paddingTop: space.md, borderTopWidth: 1, borderTopColor: colors.border },
  submit: { gap: space.sm },
});
