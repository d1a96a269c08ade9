import { TodayScreen } from '@/screens/tech/today-screen';

export default function TechToday() {
  return <TodayScreen />;
}
