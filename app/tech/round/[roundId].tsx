import { useLocalSearchParams } from 'expo-router';
import { RoundScreen } from '@/screens/rounds/round-screen';

export default function RoundRoute() {
  const { roundId, stop } = useLocalSearchParams<{ roundId: string; stop?: string }>();
  return <RoundScreen key={`${roundId}:${stop ?? ''}`} roundId={roundId} initialStop={Number(stop) || 0} />;
}
