import { useLocalSearchParams } from 'expo-router';
import { InstrumentScreen } from '@/screens/instruments/instrument-screen';

export default function Instrument() {
  const { tag } = useLocalSearchParams<{ tag: string }>();
  return <InstrumentScreen tag={decodeURIComponent(String(tag))} />;
}
