import { StyleSheet, View } from 'react-native';
import { colors, radius, space } from '../constants/theme';
import { signInUrl } from './lib/api';
import { Button } from './Button';
import { Notice } from './States';
import { Mark } from './icons';
import { Txt } from './Txt';

/** Why the server sent the browser back here (`/sign-in?error=…`). */
const FAILURES: Record<string, string> = {
  denied: 'The sign-in provider did not let you in, or you cancelled. Try again, or ask your instructor which account to use.',
  provider: 'The sign-in provider could not be reached or gave an answer Infall could not use. Try again in a minute.',
  busy: 'Too many sign-ins from your network in the last few minutes. Wait a little, then try again.',
};

/** The welcome and the one way in: through the group's sign-in provider. */
export function SignInCard({ next, failure }: { next: string; failure?: string }) {
  const reason = failure ? (FAILURES[failure] ?? 'Signing in did not work. Try again.') : null;
  const go = () => {
    if (typeof window !== 'undefined') window.location.assign(signInUrl(next));
  };
  return (
    <View style={styles.card} role="main">
      <Mark size={56} />
      <Txt variant="display" role="heading">
        infall
      </Txt>
      <Txt variant="body" style={styles.center}>
        Run small N-body systems under two force laws from the same initial conditions, then compare energy conservation, structure and rotation curves.
      </Txt>
      {reason ? (
        <View style={styles.button}>
          <Notice tone="danger">
            <Txt variant="small">{reason}</Txt>
          </Notice>
        </View>
      ) : null}
      <Button label="Sign in" onPress={go} accessibilityHint="Opens your group's sign-in page" style={styles.button} testID="sign-in" />
      <Txt variant="caption" style={styles.center}>
        You will come back here once signed in. Scripts can use a personal API token from your account page instead.
      </Txt>
    </View>
  );
}

const styles = StyleSheet.create({
  card: { width: '100%', maxWidth: 440, alignItems: 'center', gap: space.lg, padding: space.xl, borderRadius: radius.lg, backgroundColor: colors.surface, borderWidth: 1, borderColor: colors.border },
  center: { textAlign: 'center' },
  button: { alignSelf: 'stretch' },
});
