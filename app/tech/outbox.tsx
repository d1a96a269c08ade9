import { OutboxScreen } from '@/screens/rounds/outbox-screen';

export default function OutboxRoute() {
  return <OutboxScreen />;
}
