/** Choosing a JSON file from the device: on the web only (json-file-input.web.tsx); elsewhere nothing (paste the text instead). */
export interface JsonFileInputProps {
  onText: (text: string, name: string) => void;
  onError: (message: string) => void;
  testID: string;
}

export function JsonFileInput(_props: JsonFileInputProps) {
  return null;
}
