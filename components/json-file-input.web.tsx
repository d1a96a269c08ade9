/**
 * Choosing a JSON file on the web: the browser's own file input (no document-picker package),
 * read as text in the page. The native build has json-file-input.tsx, which draws nothing.
 */
import { View } from 'react-native';
import { ThemedText } from './themed-text';
import type { JsonFileInputProps } from './json-file-input';

export type { JsonFileInputProps };

/** Largest file read, bytes (the API takes 1 MB bodies). */
export const JSON_FILE_MAX_BYTES = 1_000_000;

export function JsonFileInput({ onText, onError, testID }: JsonFileInputProps) {
  return (
    <View>
      <ThemedText variant="label" bold nativeID={`${testID}-label`}>
        Or choose a file
      </ThemedText>
      <input
        type="file"
        accept=".json,application/json"
        data-testid={testID}
        aria-labelledby={`${testID}-label`}
        onChange={(e) => {
          const file = e.currentTarget.files?.[0];
          e.currentTarget.value = '';
          if (!file) return;
          if (file.size > JSON_FILE_MAX_BYTES) {
            onError(`${file.name} is ${file.size} bytes; a template may be at most ${JSON_FILE_MAX_BYTES} bytes.`);
            return;
          }
          file.text().then(
            (t) => onText(t, file.name),
            () => onError(`${file.name} could not be read.`),
          );
        }}
      />
    </View>
  );
}
