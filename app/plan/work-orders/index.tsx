import { WorkOrdersScreen } from '@/screens/work-orders/work-orders-screen';

export default function WorkOrders() {
  return <WorkOrdersScreen />;
}
