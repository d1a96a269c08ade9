import { RoundsScreen } from '@/screens/cycle/rounds-screen';

export default function Rounds() {
  return <RoundsScreen />;
}
