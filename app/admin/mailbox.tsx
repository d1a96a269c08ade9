import { MailboxScreen } from '@/screens/admin/mailbox-screen';

export default function Page() {
  return <MailboxScreen />;
}
