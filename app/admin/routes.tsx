import { RoutesScreen } from '@/screens/admin/routes-screen';

export default function Page() {
  return <RoutesScreen />;
}
