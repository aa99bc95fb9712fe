import { useEffect, useState } from 'react';
import { useTranslation } from '../../../lib/i18n';
import { get, set } from 'idb-keyval';
import { photoKey, photoStore } from '../../../lib/storage';
import type { Formatter } from '../../../lib/format';

/** About 1600 px on the long side and 300 KB: plenty to see the plant and the tape (README, "/capture on the phone"). */
const COMPRESS = { maxWidthOrHeight: 1600, maxSizeMB: 0.3, initialQuality: 0.8, fileType: 'image/jpeg', useWebWorker: false };

export async function compressPhoto(file: File): Promise<Blob> {
  // Loaded only when a photo is taken. Its web-worker mode would fetch the library from a CDN,
  // which the content security policy (and the field) do not allow: compress on the page.
  const { default: imageCompression } = await import('browser-image-compression');
  return imageCompression(file, COMPRESS);
}

/**
 * One optional photo per stop, from the phone's camera through a file input; compressed on the
 * phone and kept in IndexedDB until the walk is sent.
 */
export function PhotoButton(props: {
  walkId: string;
  stop: number;
  photo: { key: string; size: number } | undefined;
  onSaved: (p: { key: string; size: number; type: string }) => void;
  f: Formatter;
}) {
  const { t } = useTranslation();
  const [busy, setBusy] = useState(false);
  const [failed, setFailed] = useState(false);
  const [url, setUrl] = useState<string | null>(null);

  useEffect(() => {
    let live = true;
    let made: string | null = null;
    setUrl(null);
    if (props.photo) {
      void get<Blob>(props.photo.key, photoStore()).then((blob) => {
        if (!live || !blob) return;
        made = URL.createObjectURL(blob);
        setUrl(made);
      });
    }
    return () => {
      live = false;
      if (made) URL.revokeObjectURL(made);
    };
  }, [props.photo?.key, props.photo?.size]);

  async function take(file: File | undefined) {
    if (!file) return;
    setBusy(true);
    setFailed(false);
    try {
      const blob = await compressPhoto(file);
      const key = photoKey(props.walkId, props.stop);
      await set(key, blob, photoStore());
      props.onSaved({ key, size: blob.size, type: blob.type || 'image/jpeg' });
    } catch {
      setFailed(true);
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="flex items-center gap-3">
      <label className="flex min-h-14 flex-1 cursor-pointer items-center justify-center rounded-xl border-2 border-loam-400 bg-white px-4 text-lg font-bold focus-within:outline-3 focus-within:outline-sky-600">
        <input
          type="file"
          accept="image/*"
          capture="environment"
          className="sr-only"
          disabled={busy}
          onChange={(e) => {
            void take(e.target.files?.[0]);
            e.target.value = '';
          }}
        />
        {busy ? t('entry.photoWorking') : props.photo ? t('entry.retakePhoto') : t('entry.takePhoto')}
      </label>
      {url && <img src={url} alt={t('entry.photoAlt', { n: props.stop })} className="size-14 rounded-lg border-2 border-loam-300 object-cover" />}
      {props.photo && !busy && <span className="sr-only">{t('entry.photoSaved', { size: props.f.bytes(props.photo.size) })}</span>}
      {failed && (
        <p role="alert" className="font-bold text-clay-700">
          {t('entry.photoFailed')}
        </p>
      )}
    </div>
  );
}
