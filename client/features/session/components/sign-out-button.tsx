import { strings } from '../../../lib/strings';
import { useSignOut } from '../api';

export function SignOutButton() {
  const signOut = useSignOut();
  // Once it succeeded the browser is leaving: keep the button disabled until it has gone.
  const busy = signOut.isPending || signOut.isSuccess;
  return (
    <div className="flex shrink-0 flex-col items-end gap-1">
      <button
        type="button"
        onClick={() => signOut.mutate()}
        disabled={busy}
        className="min-h-touch rounded-lg whitespace-nowrap border-2 border-mist-300 px-4 font-bold text-white hover:bg-loam-700 disabled:opacity-70"
      >
        {busy ? strings.session.signingOut : strings.session.signOut}
      </button>
      {signOut.isError && (
        <p role="alert" className="text-sm font-bold text-straw-300">
          {signOut.error.message}
        </p>
      )}
    </div>
  );
}
