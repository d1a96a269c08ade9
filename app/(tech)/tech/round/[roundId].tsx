import { useLocalSearchParams } from 'expo-router';
import { RoundScreen } from '@/screens/tech/round-screen';

export default function RoundRoute() {
  const { roundId } = useLocalSearchParams<{ roundId: string }>();
  return <RoundScreen roundId={roundId} />;
}
