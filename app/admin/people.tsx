import { PeopleScreen } from '@/screens/admin/people-screen';

export default function Page() {
  return <PeopleScreen />;
}
