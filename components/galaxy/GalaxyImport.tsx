import { useMemo, useState } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { useRouter } from 'expo-router';
import { colors, fonts, space } from '../../constants/theme';
import { useCohorts } from '../../hooks/cohorts';
import { useGalaxies, useUploadGalaxy } from '../../hooks/galaxies';
import { pickTableFile, type PickedFile } from '../lib/pickFile';
import { COLUMN_KEYS, parseRotationCurve, readTableCells, TableError, type ColumnKey, type RotationCurve, type TableCells } from '../../shared/galaxy/table';
import { galaxyMappingSchema, type GalaxyMapping, type GalaxyVisibility } from '../../shared/api/galaxies';
import type { UploadLimits } from '../../shared/api/accounts';
import { Button } from '../Button';
import { ChoiceChips, FieldRow, NameField, NumberField } from '../fields';
import { formatCount, formatValue } from '../format';
import { LinePlot } from '../LinePlot';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { describeError, ErrorState, fieldError, Loading, Notice } from '../States';
import { nameProblem } from '../../shared/spec';
import { Txt } from '../Txt';
import { dataSeries } from './series';

const COLUMN_WORDS: Record<ColumnKey, string> = {
  radius: 'Radius',
  vObs: 'Observed speed',
  vErr: 'Speed error (1σ)',
  vGas: 'Gas speed (optional)',
  vDisk: 'Stellar disk speed at M/L = 1 (optional)',
  vBulge: 'Bulge speed at M/L = 1 (optional)',
};

const PREVIEW_ROWS = 6;

type Reading = { cells: TableCells; curve: RotationCurve | null; error: TableError | null } | { cells: null; curve: null; error: TableError };

function read(bytes: Uint8Array, mapping: GalaxyMapping, limits: UploadLimits): Reading {
  const lim = { maxBytes: limits.maxUploadBytes, maxRows: limits.maxUploadRows };
  let cells: TableCells;
  try {
    cells = readTableCells(bytes, lim);
  } catch (e) {
    if (e instanceof TableError) return { cells: null, curve: null, error: e };
    throw e;
  }
  try {
    return { cells, curve: parseRotationCurve(bytes, { ...lim, ...mapping }), error: null };
  } catch (e) {
    if (e instanceof TableError) return { cells, curve: null, error: e };
    throw e;
  }
}

function CellsPreview({ cells }: { cells: TableCells }) {
  const width = Math.max(cells.header?.length ?? 0, ...cells.rows.slice(0, PREVIEW_ROWS).map((r) => r.cells.length));
  const head = Array.from({ length: width }, (_, i) => `${i + 1}${cells.header?.[i] ? ` ${cells.header[i]}` : ''}`);
  return (
    <ScrollView horizontal accessibilityLabel="The first rows of the table">
      <View>
        <View style={styles.tr}>
          <Txt style={[styles.td, styles.line]}>line</Txt>
          {head.map((h, i) => (
            <Txt key={i} style={[styles.td, styles.th]}>
              {h}
            </Txt>
          ))}
        </View>
        {cells.rows.slice(0, PREVIEW_ROWS).map((r) => (
          <View key={r.line} style={styles.tr}>
            <Txt style={[styles.td, styles.line]}>{r.line}</Txt>
            {Array.from({ length: width }, (_, i) => (
              <Txt key={i} style={styles.td}>
                {r.cells[i] ?? ''}
              </Txt>
            ))}
          </View>
        ))}
      </View>
    </ScrollView>
  );
}

function ImportForm({ limits }: { limits: UploadLimits }) {
  const router = useRouter();
  const upload = useUploadGalaxy();
  const cohorts = useCohorts();
  const [file, setFile] = useState<PickedFile | null>(null);
  const [pickError, setPickError] = useState<string | null>(null);
  const [name, setName] = useState('');
  const [columns, setColumns] = useState<Partial<Record<ColumnKey, number>>>({});
  const [radiusUnit, setRadiusUnit] = useState<'kpc' | 'arcsec'>('kpc');
  const [distance, setDistance] = useState<number | undefined>(undefined);
  const [distanceErr, setDistanceErr] = useState<number | undefined>(undefined);
  const [inclination, setInclination] = useState<number | undefined>(undefined);
  const [inclinationErr, setInclinationErr] = useState<number | undefined>(undefined);
  const [visibility, setVisibility] = useState<GalaxyVisibility>('private');
  const [cohortId, setCohortId] = useState<number | undefined>(undefined);

  const measured = (value: number | undefined, error: number | undefined) => (value === undefined ? undefined : { value, ...(error === undefined ? {} : { error }) });
  const mappingCheck = galaxyMappingSchema.safeParse({ columns, radiusUnit, distanceMpc: measured(distance, distanceErr), inclinationDeg: measured(inclination, inclinationErr) });
  const mapping = mappingCheck.success ? mappingCheck.data : null;
  const mappingKey = JSON.stringify(mapping);
  const reading = useMemo(() => (file && mapping ? read(file.bytes, mapping, limits) : null), [file, mappingKey, limits]); // eslint-disable-line react-hooks/exhaustive-deps
  const width = reading?.cells ? Math.max(reading.cells.header?.length ?? 0, ...reading.cells.rows.map((r) => r.cells.length)) : 0;
  const choices = [{ value: 0, label: 'auto' }, ...Array.from({ length: width }, (_, i) => ({ value: i + 1, label: reading?.cells?.header?.[i] || `column ${i + 1}` }))];
  const chosenCohort = visibility === 'cohort' ? (cohortId ?? cohorts.data?.[0]?.id) : undefined;

  const pick = async () => {
    setPickError(null);
    try {
      const picked = await pickTableFile(limits.maxUploadBytes);
      if (!picked) return;
      setFile(picked);
      setColumns({});
      if (!name) setName(picked.name.replace(/\.[^.]+$/, '').slice(0, 80));
    } catch (e) {
      setPickError(e instanceof Error ? e.message : String(e));
    }
  };

  const send = () => {
    if (!file || !mapping) return;
    upload.mutate({ file, name: name.trim(), mapping, visibility, cohortId: chosenCohort }, { onSuccess: (g) => router.replace({ pathname: '/galaxies/[id]', params: { id: String(g.id) } }) });
  };

  return (
    <>
      <Panel title="1 · The table" note={`CSV or columns separated by spaces; one row per radius; # starts a comment. Your limits: ${formatCount(limits.maxUploadBytes)} bytes, ${formatCount(limits.maxUploadRows)} rows.`}>
        <View style={styles.inline}>
          <Button label={file ? 'Choose another file' : 'Choose a file'} tone={file ? 'secondary' : 'primary'} onPress={() => void pick()} testID="galaxy-pick" />
          {file ? (
            <Txt variant="mono" testID="galaxy-file">
              {file.name} · {formatCount(file.bytes.length)} bytes
            </Txt>
          ) : null}
        </View>
        {pickError ? <Notice tone="danger">{pickError}</Notice> : null}
        {reading?.cells ? <CellsPreview cells={reading.cells} /> : null}
      </Panel>

      {file ? (
        <Panel title="2 · Columns and units" note="Auto reads the header's names, or the order radius, speed, error, gas, disk, bulge. Speeds are in km/s.">
          {COLUMN_KEYS.map((key) => (
            <ChoiceChips key={key} label={COLUMN_WORDS[key]} value={columns[key] ?? 0} compact choices={choices} onChange={(v) => setColumns((c) => (v === 0 ? Object.fromEntries(Object.entries(c).filter(([k]) => k !== key)) : { ...c, [key]: v }))} />
          ))}
          <ChoiceChips label="Radius unit" value={radiusUnit} onChange={setRadiusUnit} compact choices={[{ value: 'kpc', label: 'kpc' }, { value: 'arcsec', label: 'arcsec', note: 'converted with the distance below (small-angle)' }]} />
          <FieldRow>
            <NumberField label="Distance" unit="Mpc" value={distance} onChange={setDistance} min={0} exclusiveMin max={1000} optional hint={radiusUnit === 'arcsec' ? 'needed for arcsec radii' : 'if known'} testID="galaxy-distance" />
            <NumberField label="Distance error" unit="Mpc" value={distanceErr} onChange={setDistanceErr} min={0} exclusiveMin max={1000} optional />
          </FieldRow>
          <FieldRow>
            <NumberField label="Inclination" unit="°" value={inclination} onChange={setInclination} min={0} max={90} optional hint="if known" />
            <NumberField label="Inclination error" unit="°" value={inclinationErr} onChange={setInclinationErr} min={0} exclusiveMin max={90} optional />
          </FieldRow>
          {!mappingCheck.success ? <Notice tone="danger">{mappingCheck.error.issues[0].path.join('.')}: {mappingCheck.error.issues[0].message}</Notice> : null}
        </Panel>
      ) : null}

      {file && reading ? (
        <Panel title="3 · Preview" note="Read exactly as the server will read it.">
          {reading.error ? (
            <View role="alert" testID="galaxy-table-error">
              <Notice tone="danger">{reading.error.message}</Notice>
            </View>
          ) : reading.curve ? (
            <>
              <Txt variant="small" testID="galaxy-preview-summary">
                {reading.curve.radiusKpc.length} points from {formatValue(reading.curve.radiusKpc[0])} to {formatValue(reading.curve.radiusKpc[reading.curve.radiusKpc.length - 1])} kpc; components:{' '}
                {[reading.curve.vGas && 'gas', reading.curve.vDisk && 'stellar disk', reading.curve.vBulge && 'bulge'].filter(Boolean).join(', ') || 'none'}.
              </Txt>
              <LinePlot series={[dataSeries(reading.curve)]} xLabel="radius [kpc]" yLabel="speed [km/s]" yFromZero xFromZero height={220} accessibilityLabel="Preview of the rotation curve" testID="galaxy-preview" />
            </>
          ) : null}
        </Panel>
      ) : null}

      {file ? (
        <Panel title="4 · Name and sharing">
          <NameField label="Name" value={name} onChange={setName} placeholder="e.g. an invented dwarf" error={fieldError(upload.error, 'name')} testID="galaxy-name" />
          <ChoiceChips
            label="Who sees it"
            value={visibility}
            onChange={setVisibility}
            compact
            choices={[
              { value: 'private', label: 'Only me' },
              ...(cohorts.data?.length ? [{ value: 'cohort' as const, label: 'A cohort' }] : []),
              { value: 'public', label: 'Everyone signed in' },
            ]}
          />
          {visibility === 'cohort' && cohorts.data?.length ? (
            <ChoiceChips label="Cohort" value={chosenCohort ?? 0} onChange={setCohortId} compact choices={cohorts.data.map((c) => ({ value: c.id, label: c.name }))} />
          ) : null}
          <Button label="Upload" disabled={!reading?.curve || !name.trim() || Boolean(nameProblem(name))} busy={upload.isPending} onPress={send} testID="galaxy-upload" />
          {upload.isError && !fieldError(upload.error, 'name') ? <Notice tone="danger">{describeError(upload.error)}</Notice> : null}
        </Panel>
      ) : null}
    </>
  );
}

/** Import a rotation-curve table: pick the file, say which column is which, check the preview, upload. */
export function GalaxyImport() {
  const list = useGalaxies();
  return (
    <Screen title="Import a rotation curve" subtitle="Nothing is stored until the upload succeeds; the server reads the file again with the same rules.">
      {list.isPending ? <Loading what="Loading your limits" /> : list.isError ? <ErrorState error={list.error} onRetry={() => list.refetch()} /> : <ImportForm limits={list.data.limits} />}
    </Screen>
  );
}

const styles = StyleSheet.create({
  inline: { flexDirection: 'row', alignItems: 'center', gap: space.md, flexWrap: 'wrap' },
  tr: { flexDirection: 'row' },
  td: { fontFamily: fonts.mono, fontSize: 12, color: colors.text, minWidth: 72, paddingHorizontal: space.xs, paddingVertical: 2, borderBottomWidth: 1, borderBottomColor: colors.border },
  th: { color: colors.textMuted, fontFamily: fonts.monoMedium },
  line: { color: colors.textFaint, minWidth: 40 },
});
