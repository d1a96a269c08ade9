/** The dev mailbox: what the server's mail fake received, newest first (for trying the e-mails out). */
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Card } from '@/components/card';
import { ThemedText } from '@/components/themed-text';
import { space, touchTarget } from '@/constants/theme';
import { useMailbox } from '@/hooks/queries/admin';
import { useSession } from '@/hooks/session';

export function MailboxScreen() {
  const q = useMailbox();
  const { membership } = useSession();
  const [open, setOpen] = useState<string | null>(null);
  return (
    <View style={styles.stack}>
      <ThemedText variant="heading">Dev mailbox</ThemedText>
      <ThemedText variant="label" muted>
        {`Mail the server sent about ${membership?.siteName ?? 'this site'} while no real mail server is set up. Other sites' mail is not shown. Nothing here left the machine.`}
      </ThemedText>
      {q.error ? (
        <ThemedText tone="danger" testID="mailbox-error">
          {q.error.message}
        </ThemedText>
      ) : null}
      {q.isPending ? <ThemedText muted>Loading…</ThemedText> : null}
      {q.data && q.data.messages.length === 0 ? (
        <ThemedText muted testID="mailbox-empty">
          No mail yet.
        </ThemedText>
      ) : null}
      {q.data?.messages.map((m) => (
        <Card key={m.id} testID={`mail-${m.id}`}>
          <Pressable
            accessibilityRole="button"
            onPress={() => setOpen(open === m.id ? null : m.id)}
            style={styles.head}
            testID={`mail-${m.id}-toggle`}
          >
            <ThemedText variant="label" bold>
              {m.subject}
            </ThemedText>
            <ThemedText
              variant="caption"
              muted
            >{`${new Date(m.receivedAt).toLocaleString()} · to ${m.to.join(', ')}`}</ThemedText>
          </Pressable>
          {open === m.id ? (
            <ThemedText variant="label" testID={`mail-${m.id}-text`}>
              {m.text}
            </ThemedText>
          ) : null}
        </Card>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  head: { minHeight: touchTarget, justifyContent: 'center', gap: space.xxs },
});
