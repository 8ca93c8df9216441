import { useState } from 'react';
import { View } from 'react-native';
import { COHORT_CEILING, type QuotaLimits } from '../../shared/api/accounts';
import { space } from '../../constants/theme';
import { Button } from '../Button';
import { FieldRow, NumberField } from '../fields';
import { describeError, Notice } from '../States';

export const QUOTA_FIELDS: { key: keyof QuotaLimits; label: string; unit?: string }[] = [
  { key: 'maxParticles', label: 'Max particles per run' },
  { key: 'maxSteps', label: 'Max steps per run', unit: 'steps' },
  { key: 'maxConcurrentRuns', label: 'Runs at a time' },
  { key: 'dailyInteractions', label: 'Daily compute, in pair interactions' },
];

type Draft = { [K in keyof QuotaLimits]: number | undefined | null };

/**
 * Four limits with the server's ceilings (a cohort's by default: what instructors have). With
 * `nullable`, an empty field means "no override" (the admin's per-person allocation); otherwise
 * every limit is required. A field whose text does not parse holds NaN, which blocks saving.
 */
export function QuotaEditor({ value, onSave, saving, error, nullable, ceiling = COHORT_CEILING, saveLabel = 'Save quota' }: { value: Draft; onSave: (v: Draft) => void; saving: boolean; error: unknown; nullable?: boolean; ceiling?: QuotaLimits; saveLabel?: string }) {
  const [draft, setDraft] = useState<Draft>(value);
  const bad = QUOTA_FIELDS.some(({ key }) => {
    const v = draft[key];
    if (v === undefined || v === null) return !nullable;
    return !Number.isInteger(v) || v < 1 || v > ceiling[key];
  });
  return (
    <View style={{ gap: space.md }}>
      <FieldRow>
        {QUOTA_FIELDS.map(({ key, label, unit }) => (
          <NumberField
            key={key}
            label={label}
            unit={unit}
            value={draft[key] ?? undefined}
            onChange={(v) => setDraft((d) => ({ ...d, [key]: v === undefined && nullable ? null : v }))}
            min={1}
            max={ceiling[key]}
            integer
            optional={nullable}
            emptyMeans="the role or cohort limit"
            testID={`quota-${key}`}
          />
        ))}
      </FieldRow>
      {error ? <Notice tone="danger">{describeError(error)}</Notice> : null}
      <Button label={saveLabel} disabled={bad} busy={saving} onPress={() => onSave(draft)} style={{ alignSelf: 'flex-start' }} />
    </View>
  );
}
