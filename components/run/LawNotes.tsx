import { StyleSheet, View } from 'react-native';
import type { LawInfo } from '../../shared/engine';
import { colors, lawColor, space } from '../../constants/theme';
import { Panel } from '../Panel';
import { Txt } from '../Txt';

function Conserved({ what, yes, defined = true }: { what: string; yes: boolean; defined?: boolean }) {
  const text = !defined ? 'not defined' : yes ? 'conserved' : 'not conserved';
  const color = !defined ? colors.textFaint : yes ? colors.ok : colors.warning;
  return (
    <View style={styles.row} accessibilityLabel={`${what}: ${text}`}>
      <Txt variant="small" color={colors.text} style={styles.what}>
        {what}
      </Txt>
      <Txt variant="mono" color={color}>
        {!defined ? '–' : yes ? '✓' : '≠'} {text}
      </Txt>
    </View>
  );
}

/** What the law conserves and where it can be trusted, so drifts are read as physics or as error. */
export function LawNotes({ info }: { info: LawInfo }) {
  return (
    <Panel title={`Law: ${info.label}`} accessibilityLabel={`About the force law ${info.label}`} style={{ borderTopColor: lawColor(info.kind), borderTopWidth: 3 }}>
      <View style={styles.table}>
        <Conserved what="Energy" yes={info.conservesEnergy} defined={info.hasPotential} />
        <Conserved what="Momentum" yes={info.conservesMomentum} />
        <Conserved what="Angular momentum" yes={info.conservesAngularMomentum} />
      </View>
      <View style={styles.block}>
        <Txt variant="label">Domain of validity</Txt>
        <Txt variant="small" color={colors.text}>
          {info.validity}
        </Txt>
      </View>
      <View style={styles.block}>
        <Txt variant="label">How to read the drifts</Txt>
        <Txt variant="small">{info.notes}</Txt>
      </View>
      {info.readings ? (
        <View style={styles.block} role="note" accessibilityLabel={`What the results of ${info.label} mean`}>
          <Txt variant="label">Meaningful in these runs</Txt>
          <Txt variant="small" color={colors.text}>
            {info.readings.meaningful}
          </Txt>
          <Txt variant="label" color={colors.warning}>
            Not meaningful in these runs
          </Txt>
          <Txt variant="small" color={colors.text}>
            {info.readings.notMeaningful}
          </Txt>
        </View>
      ) : null}
    </Panel>
  );
}

/** The standing caution on every results page. */
export function ModelCaution() {
  return (
    <View style={styles.caution} role="note" accessibilityLabel="Caution: results are numerical models">
      <Txt variant="small" color={colors.text}>
        <Txt variant="small" color={colors.warning} style={{ fontWeight: '600' }}>
          Numerical model.{' '}
        </Txt>
        These results come from a softened N-body integration with a finite number of particles and a finite timestep, under a force law that holds only in its own domain. They are not observations; check drifts, particle number and timestep before drawing conclusions.
      </Txt>
    </View>
  );
}

const styles = StyleSheet.create({
  table: { gap: space.xs },
  row: { flexDirection: 'row', justifyContent: 'space-between', gap: space.md, paddingVertical: 4, borderBottomWidth: 1, borderBottomColor: colors.border },
  what: { flex: 1 },
  block: { gap: 4 },
  caution: { borderWidth: 1, borderColor: colors.border, borderRadius: 10, padding: space.md, backgroundColor: colors.surface },
});
