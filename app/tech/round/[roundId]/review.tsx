import { useLocalSearchParams } from 'expo-router';
import { ReviewScreen } from '@/screens/rounds/round-check-screen';

export default function RoundReviewRoute() {
  const { roundId } = useLocalSearchParams<{ roundId: string }>();
  return <ReviewScreen roundId={roundId} />;
}
