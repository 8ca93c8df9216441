import { View } from 'react-native';
import { Link } from 'expo-router';
import { Mark } from '../components/icons';
import { Txt } from '../components/Txt';
import { colors, space } from '../constants/theme';

export default function NotFound() {
  return (
    <View style={{ flex: 1, alignItems: 'center', justifyContent: 'center', gap: space.md, padding: space.xl, backgroundColor: colors.background }} role="main">
      <Mark size={48} />
      <Txt variant="title" role="heading">
        Nothing fell in here
      </Txt>
      <Txt variant="small">This page does not exist, or the link is old.</Txt>
      <Link href="/" role="link" style={{ color: colors.link, fontSize: 15 }}>
        Back to your runs
      </Link>
    </View>
  );
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../components/States';
