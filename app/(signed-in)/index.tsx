import { RunsBoard } from '../../components/RunsBoard';

export default function RunsScreen() {
  return <RunsBoard />;
}
