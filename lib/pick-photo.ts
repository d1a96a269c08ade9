import * as ImagePicker from 'expo-image-picker';

/**
 * A photo from the camera or the library, as bytes. On the web the picker hands a `File`
 * (asset.file); elsewhere the bytes are read from the asset's URI. A cancelled picker on the web
 * may never resolve: callers must not hold the screen busy while waiting.
 */
export async function pickPhoto(
  source: 'camera' | 'library' = 'library',
): Promise<{ bytes: Uint8Array; mime: string } | null> {
  const opts: ImagePicker.ImagePickerOptions = { mediaTypes: ['images'], quality: 0.8, exif: false };
  const r =
    source === 'camera' ? await ImagePicker.launchCameraAsync(opts) : await ImagePicker.launchImageLibraryAsync(opts);
  if (r.canceled || !r.assets?.[0]) return null;
  const a = r.assets[0];
  const buf = a.file ? await a.file.arrayBuffer() : await (await fetch(a.uri)).arrayBuffer();
  return { bytes: new Uint8Array(buf), mime: a.mimeType ?? a.file?.type ?? 'image/jpeg' };
}
