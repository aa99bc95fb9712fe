// English strings for the capture app, in one place until i18n arrives (a later issue).
export const strings = {
  appName: 'Crowntip',
  loading: 'Loading…',
  today: {
    title: "Today's walks",
    empty: 'No walks planned for today yet',
    emptyHint: 'Walks the office plans for you will appear here.',
    caution: 'Field estimates are screening figures; the local rule and your adviser decide what is reported.',
  },
  session: {
    signOut: 'Sign out',
    signingOut: 'Signing out…',
    signedInAs: 'Signed in as',
    redirecting: 'Taking you to sign in…',
  },
  errors: {
    title: 'Something went wrong',
    retry: 'Try again',
    notFound: 'This page does not exist.',
    backToToday: "Back to today's walks",
    network: 'No connection to the server.',
    badResponse: 'The server sent an answer this app does not understand.',
    byStatus: {
      401: 'Please sign in again.',
      403: 'You are not allowed to do that.',
      404: 'Not found.',
      429: 'Too many attempts; wait a minute and try again.',
      500: 'The server had a problem; try again shortly.',
    },
    generic: 'The request did not succeed.',
  },
} as const;
