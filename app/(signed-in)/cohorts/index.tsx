import { CohortsView } from '../../../components/cohorts/CohortsView';

export default function CohortsScreen() {
  return <CohortsView />;
}
