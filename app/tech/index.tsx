import { TodayScreen } from '@/screens/rounds/today-screen';

export default function TechToday() {
  return <TodayScreen />;
}
