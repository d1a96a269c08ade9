import { InstrumentHealthScreen } from '@/screens/eng/instrument-health-screen';

export default function Instruments() {
  return <InstrumentHealthScreen />;
}
