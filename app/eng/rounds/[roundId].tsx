import { useLocalSearchParams } from 'expo-router';
import { CycleScreen } from '@/screens/cycle/cycle-screen';

export default function RoundCycle() {
  const { roundId } = useLocalSearchParams<{ roundId: string }>();
  return <CycleScreen roundId={String(roundId)} />;
}
