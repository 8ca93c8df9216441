import { useState } from 'react';
import { View } from 'react-native';
import { COHORT_CEILING, LIMIT_FLOORS, type QuotaLimits } from '../../shared/api/accounts';
import { space } from '../../constants/theme';
import { Button } from '../Button';
import { FieldRow, NumberField } from '../fields';
import { describeError, Notice } from '../States';

/** `scale`: the field shows the limit divided by it (bytes typed in whole KB). */
export const QUOTA_FIELDS: { key: keyof QuotaLimits; label: string; unit?: string; scale?: number }[] = [
  { key: 'maxParticles', label: 'Max particles per run' },
  { key: 'maxSteps', label: 'Max steps per run', unit: 'steps' },
  { key: 'maxConcurrentRuns', label: 'Runs at a time' },
  { key: 'dailyInteractions', label: 'Daily compute, in pair interactions' },
  { key: 'maxUploadBytes', label: 'Largest table file', unit: 'KB', scale: 1024 },
  { key: 'maxUploadRows', label: 'Rows per table', unit: 'rows' },
];

type Draft = { [K in keyof QuotaLimits]: number | undefined | null };

/**
 * The limits with the server's ceilings (a cohort's by default: what instructors have). With
 * `nullable`, an empty field means "no override" (the admin's per-person allocation); otherwise
 * every limit is required. A field whose text does not parse holds NaN, which blocks saving.
 */
export function QuotaEditor({ value, onSave, saving, error, nullable, ceiling = COHORT_CEILING, saveLabel = 'Save quota' }: { value: Draft; onSave: (v: Draft) => void; saving: boolean; error: unknown; nullable?: boolean; ceiling?: QuotaLimits; saveLabel?: string }) {
  const [draft, setDraft] = useState<Draft>(value);
  const bad = QUOTA_FIELDS.some(({ key, scale = 1 }) => {
    const v = draft[key];
    if (v === undefined || v === null) return !nullable;
    return !Number.isInteger(v / scale) || v < LIMIT_FLOORS[key] || v > ceiling[key];
  });
  return (
    <View style={{ gap: space.md }}>
      <FieldRow>
        {QUOTA_FIELDS.map(({ key, label, unit, scale = 1 }) => (
          <NumberField
            key={key}
            label={label}
            unit={unit}
            value={typeof draft[key] === 'number' ? draft[key] / scale : undefined}
            // Whole KB times 1024 and back is exact, so the typed text is never rewritten; NaN stays NaN.
            onChange={(v) => setDraft((d) => ({ ...d, [key]: v === undefined && nullable ? null : v === undefined ? v : v * scale }))}
            min={LIMIT_FLOORS[key] / scale}
            max={ceiling[key] / scale}
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
