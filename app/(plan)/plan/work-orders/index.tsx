import { WorkOrdersScreen } from '@/screens/plan/work-orders-screen';

export default function WorkOrders() {
  return <WorkOrdersScreen />;
}
