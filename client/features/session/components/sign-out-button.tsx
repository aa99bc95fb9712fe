import { useTranslation } from '../../../lib/i18n';
import { useSignOut } from '../api';

export function SignOutButton() {
  const { t } = useTranslation();
  const signOut = useSignOut();
  // Once it succeeded the browser is leaving: keep the button disabled until it has gone.
  const busy = signOut.pending || signOut.done;
  return (
    <div className="flex shrink-0 flex-col items-end gap-1">
      <button
        type="button"
        onClick={() => signOut.run()}
        disabled={busy}
        className="min-h-touch rounded-lg border-2 border-mist-300 px-4 font-bold whitespace-nowrap text-white hover:bg-loam-700 disabled:opacity-70"
      >
        {busy ? t('session.signingOut') : t('session.signOut')}
      </button>
      {signOut.error && (
        <p role="alert" className="text-sm font-bold text-straw-300">
          {signOut.error.message}
        </p>
      )}
    </div>
  );
}
