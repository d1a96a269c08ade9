import { InstrumentHealthScreen } from '@/screens/instruments/instrument-health-screen';

export default function Instruments() {
  return <InstrumentHealthScreen />;
}
