import { useLocalSearchParams } from 'expo-router';
import { RoundCheckScreen } from '@/screens/rounds/round-check-screen';

export default function RoundCheckRoute() {
  const { roundId } = useLocalSearchParams<{ roundId: string }>();
  return <RoundCheckScreen roundId={roundId} />;
}
