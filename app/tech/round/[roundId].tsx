import { useLocalSearchParams } from 'expo-router';
import { RoundScreen } from '@/screens/rounds/round-screen';

export default function RoundRoute() {
  const { roundId, stop, focus } = useLocalSearchParams<{ roundId: string; stop?: string; focus?: string }>();
  // no stop in the address: the round opens at the stop the technician was last on
  const initialStop = stop !== undefined && Number.isInteger(Number(stop)) ? Number(stop) : undefined;
  return (
    <RoundScreen
      key={`${roundId}:${stop ?? ''}:${focus ?? ''}`}
      roundId={roundId}
      initialStop={initialStop}
      focusTag={focus}
    />
  );
}
