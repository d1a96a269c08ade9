import { RoleHomeScreen } from '@/screens/role-home-screen';

export default function Home() {
  return <RoleHomeScreen role="planner" />;
}
