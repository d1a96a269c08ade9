import { useLocalSearchParams } from 'expo-router';
import { WorkOrderScreen } from '@/screens/work-orders/work-order-screen';

export default function WorkOrder() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <WorkOrderScreen id={String(id)} cycleHref={(roundId) => `/plan/rounds/${roundId}`} />;
}
