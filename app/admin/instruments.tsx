import { AdminInstrumentsScreen } from '@/screens/admin/instruments-screen';

export default function Page() {
  return <AdminInstrumentsScreen />;
}
