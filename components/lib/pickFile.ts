import * as DocumentPicker from 'expo-document-picker';
import { groupDigits } from '../../shared/api/quotaWords';

/** A table file picked on the device: its name, the Blob to upload, and its bytes to preview. */
export interface PickedFile {
  name: string;
  blob: Blob;
  bytes: Uint8Array;
}

function blobBytes(blob: Blob): Promise<ArrayBuffer> {
  if (typeof blob.arrayBuffer === 'function') return blob.arrayBuffer();
  return new Promise((resolve, reject) => {
    const reader = new FileReader();
    reader.onload = () => resolve(reader.result as ArrayBuffer);
    reader.onerror = () => reject(reader.error);
    reader.readAsArrayBuffer(blob);
  });
}

/** Opens the system picker for a text table; refuses a file over the byte limit before reading it. Null if cancelled. */
export async function pickTableFile(maxBytes = Infinity, extraTypes: string[] = []): Promise<PickedFile | null> {
  const result = await DocumentPicker.getDocumentAsync({ type: ['text/csv', 'text/plain', 'text/tab-separated-values', '.csv', '.txt', '.dat', ...extraTypes, '*/*'], multiple: false, base64: false });
  if (result.canceled || !result.assets?.length) return null;
  const asset = result.assets[0];
  if (asset.size !== undefined && asset.size > maxBytes) throw new Error(`the file is ${groupDigits(asset.size)} bytes; your upload limit is ${groupDigits(maxBytes)}`);
  const blob = asset.file ?? (await (await fetch(asset.uri)).blob());
  return { name: asset.name, blob, bytes: new Uint8Array(await blobBytes(blob)) };
}
