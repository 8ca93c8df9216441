import { StyleSheet, View } from 'react-native';
import { colors, space } from '../../constants/theme';
import { Panel } from '../Panel';
import { Txt } from '../Txt';
import { setupVsLaw, type SetupSide } from './setupVsLaw';

function Lines({ heading, lines }: { heading: string; lines: string[] }) {
  return (
    <View style={styles.block} accessibilityLabel={heading}>
      <Txt variant="label">{heading}</Txt>
      {lines.map((line) => (
        <Txt key={line} variant="body">
          • {line}
        </Txt>
      ))}
    </View>
  );
}

/** The written comparison, split into set-up and law differences; unbalanced starts are said first. */
export function SetupVsLaw({ a, b }: { a: SetupSide; b: SetupSide }) {
  const text = setupVsLaw(a, b);
  return (
    <Panel title="How they differ" accessibilityLabel="Summary of differences">
      {text.cautions.map((c) => (
        <Txt key={c} variant="body" color={colors.warning} accessibilityLabel="Caution">
          ⚠ {c}
        </Txt>
      ))}
      <Lines heading="Set-up" lines={text.setup} />
      <View style={styles.block} accessibilityLabel="Law">
        <Txt variant="label">Law</Txt>
        <Txt variant="small">{text.lawIntro}</Txt>
        {text.law.map((line) => (
          <Txt key={line} variant="body">
            • {line}
          </Txt>
        ))}
      </View>
    </Panel>
  );
}

const styles = StyleSheet.create({
  block: { gap: space.xs, marginTop: space.sm },
});
