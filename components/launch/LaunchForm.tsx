import { StyleSheet, View, useWindowDimensions } from 'react-native';
import { useRouter } from 'expo-router';
import type { LawSpec, RunSpecInput } from '../../shared/spec';
import { colors, space, WIDE_BREAKPOINT } from '../../constants/theme';
import { ApiError } from '../../hooks/api';
import { LAW_PRESETS, useRunDraft } from '../../hooks/runDraft';
import { useSubmitRun } from '../../hooks/runs';
import { enumOptions } from '../../hooks/specSchema';
import { Button } from '../Button';
import { ChoiceChips, FieldRow, TextField, Toggle } from '../fields';
import { formatCount } from '../format';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { describeError, Notice } from '../States';
import { Txt } from '../Txt';
import { CostPanel } from './CostPanel';
import { styles as formStyles } from './formStyles';
import { LawEditor } from './LawEditor';
import { ModelEditor } from './ModelEditor';
import { ChecksPreview, CurvePreview } from './PreviewPanels';
import { SpecNumber } from './SpecField';

const INTEGRATOR_LABELS: Record<string, { label: string; note: string }> = {
  leapfrog: { label: 'Leapfrog (KDK)', note: 'Second order, symplectic: energy error stays bounded. The usual choice.' },
  yoshida4: { label: 'Yoshida 4th order', note: 'Fourth-order symplectic; three force evaluations per step.' },
  rk4: { label: 'RK4', note: 'Classical Runge–Kutta, not symplectic: energy drifts steadily. Useful as a foil.' },
};

function quotaMessage(e: ApiError): string {
  const d = e.details as { limit?: string; max?: number; needed?: number; remaining?: number } | undefined;
  if (!d || d.needed === undefined) return e.message;
  return `${e.message} (limit: ${d.limit}; needed ${formatCount(d.needed)}, ${formatCount(d.remaining ?? 0)} left of ${formatCount(d.max ?? 0)})`;
}

export interface LaunchStart {
  spec: RunSpecInput;
  pairLaw?: LawSpec | null;
  name?: string;
  /** Where the starting point came from, shown under the title. */
  origin: string;
}

/** The new-run form with its live preview, checks and cost; `start` comes from a clone or a template. */
export function LaunchForm({ start }: { start?: LaunchStart }) {
  const router = useRouter();
  const form = useRunDraft(start?.spec, start?.pairLaw, start?.name);
  const submit = useSubmitRun();
  const { width } = useWindowDimensions();
  const wide = width >= WIDE_BREAKPOINT;
  const { draft, set, issues } = form;
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

  const submitError = submit.error instanceof ApiError && submit.error.code === 'QUOTA_EXCEEDED' ? quotaMessage(submit.error) : submit.error ? describeError(submit.error) : null;
  const problems = Object.keys(issues).length;

  const formColumn = (
    <View style={styles.column}>
      <Panel title="Name">
        <TextField label="Run name (optional)" value={form.name} onChange={form.setName} placeholder="e.g. disk, halo vs MOND" hint="Left empty, the name says the model and law." testID="field-name" />
      </Panel>
      <Panel title="Initial conditions">
        <ModelEditor draft={draft} set={set} issues={issues} pairLaw={form.pairLaw} />
      </Panel>
      <Panel title="Force law">
        <LawEditor label="Law" law={law} onChange={(l) => set(['law'], l)} issues={issues} issuePrefix="law." exclude={form.pairLaw?.kind} testID="law-first" />
        <Toggle
          label="Run as a pair under a second law"
          value={Boolean(form.pairLaw)}
          onChange={(on) => form.setPairLaw(on ? LAW_PRESETS[law.kind === 'mond' || law.kind === 'qumond' ? 'newton' : 'qumond'] : null)}
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
          choices={enumOptions(['integrator'], draft).map((k) => ({ value: k, label: INTEGRATOR_LABELS[k]?.label ?? k, note: INTEGRATOR_LABELS[k]?.note }))}
        />
        <ChoiceChips
          label="Force solver"
          value={solver.kind}
          onChange={(k) => set(['solver'], k === 'tree' ? { kind: 'tree', theta: 0.6 } : { kind: 'direct' })}
          choices={[
            { value: 'direct', label: 'Direct sum', note: 'Every pair, exact up to softening: cost grows as N².' },
            { value: 'tree', label: 'Barnes–Hut tree', note: 'Approximate far forces by cells: cost grows as N log N; error set by θ.' },
          ]}
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
      <CurvePreview preview={form.preview} isKepler={(draft.model as { kind: string }).kind === 'kepler'} />
      <ChecksPreview preview={form.preview} timestep={typeof draft.timestep_Myr === 'number' ? draft.timestep_Myr : undefined} onTimestep={(dt) => set(['timestep_Myr'], dt)} />
      <CostPanel cost={form.cost} />
      <View style={styles.submit}>
        {problems ? (
          <Txt variant="small" color={colors.danger} accessibilityLiveRegion="polite">
            {problems === 1 ? '1 field needs attention.' : `${problems} fields need attention.`}
          </Txt>
        ) : null}
        {submitError ? <Notice tone="danger">{submitError}</Notice> : null}
        <Button label={form.pairLaw ? 'Launch the pair' : 'Launch run'} onPress={onSubmit} disabled={!form.valid} busy={submit.isPending} testID="launch" />
      </View>
    </View>
  );

  return (
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
  );
}

const styles = StyleSheet.create({
  columns: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  column: { gap: space.lg },
  pair: { gap: space.md, paddingTop: space.md, borderTopWidth: 1, borderTopColor: colors.border },
  submit: { gap: space.sm },
});
