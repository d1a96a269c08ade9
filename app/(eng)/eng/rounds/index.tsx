import { RoundsScreen } from '@/screens/eng/rounds-screen';

export default function Rounds() {
  return <RoundsScreen />;
}
