import { OutboxScreen } from '@/screens/tech/outbox-screen';

export default function OutboxRoute() {
  return <OutboxScreen />;
}
