import { StyleSheet } from 'react-native';
import { space } from '../../constants/theme';

export const styles = StyleSheet.create({
  group: { gap: space.md },
});
