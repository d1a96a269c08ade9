import { useEffect, useState } from 'react';
import { Image, StyleSheet, View } from 'react-native';
import { radius } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import type { Store } from '@/offline/store';
import { ThemedText } from './themed-text';

function base64(bytes: Uint8Array): string {
  let s = '';
  for (let i = 0; i < bytes.length; i += 0x8000) s += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(s);
}

/** A photo held on the device, shown from its stored bytes (works offline). */
export function PhotoThumb({
  store,
  id,
  mime,
  state,
  testID,
}: {
  store: Store;
  id: string;
  mime: string;
  state: string;
  testID: string;
}) {
  const { colors } = useTheme();
  const [uri, setUri] = useState<string | null>(null);
  useEffect(() => {
    let live = true;
    store.photoData(id).then((b) => live && b && setUri(`data:${mime};base64,${base64(b)}`));
    return () => {
      live = false;
    };
  }, [store, id, mime]);
  return (
    <View style={[styles.box, { borderColor: colors.rule }]} testID={testID}>
      {uri ? <Image source={{ uri }} style={styles.img} accessibilityLabel="Photo taken on this round" /> : null}
      <ThemedText variant="caption" muted testID={`${testID}-state`}>
        {state === 'stored' ? 'On server' : 'On this device'}
      </ThemedText>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { width: 104, gap: 2, borderWidth: 1, borderRadius: radius.sm, padding: 2 },
  img: { width: 98, height: 74 },
});
