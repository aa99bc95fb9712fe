import { CROP_LABELS } from '../../shared/registry/crops';

/**
 * English text of the capture app's first screen and of what every screen shows (header, outbox,
 * errors); the later screens' text is in screens-en.ts. Every key must also be in es.ts, and
 * every key of screens-en.ts in screens-es.ts (tests/client/i18n.test.ts).
 * Numbers, lengths and dates arrive already formatted for the language (lib/format.ts).
 * Plurals use `_one` / `_other` suffixes with `count` (lib/i18n.ts).
 */
export const en = {
  app: {
    name: 'Crowntip',
    loading: 'Loading…',
    back: 'Back',
  },
  units: {
    in: 'in',
    cm: 'cm',
    ft: 'ft',
    m: 'm',
    lbac: 'lb/ac',
    kgha: 'kg/ha',
    ac: 'ac',
    ha: 'ha',
  },
  session: {
    signOut: 'Sign out',
    signingOut: 'Signing out…',
    signedInAs: 'Signed in as',
    redirecting: 'Taking you to sign in…',
    needSignal: 'Open Crowntip once with signal to sign in. After that it works without signal.',
  },
  prefs: {
    title: 'Language and units',
    language: 'Language',
    units: 'Units',
    unitsUs: 'inches · lb/ac',
    unitsMetric: 'cm · kg/ha',
    pending: 'Saved on this phone; the office gets it when there is signal.',
  },
  net: {
    offline: 'No signal',
    offlineHint: 'Everything you enter is kept on this phone.',
  },
  queue: {
    boundary: 'Field outline traced, {{points}} positions',
    // What waits, "{{what}}" below: walks, traced boundaries (field outlines), or both.
    walks_one: '{{count}} walk',
    walks_other: '{{count}} walks',
    outlines_one: '{{count}} field outline',
    outlines_other: '{{count}} field outlines',
    walksAndOutlines: '{{walks}} and {{outlines}}',
    waiting: '{{what}} waiting to send',
    offlineWaiting: 'No signal: {{what}} waiting to send',
    sending: 'Sending…',
    autoRetry: 'It will be sent on its own when the signal is back.',
    // `count` is how many things, walks and outlines together, for the verb.
    attention_one: '{{what}} needs attention',
    attention_other: '{{what}} need attention',
    signin: 'Sign in again to send {{what}}',
    signInLink: 'Sign in',
    retry: 'Try now',
    details: 'Details',
    conflict:
      'The office already has a different walk with the same id. Nothing was deleted: it stays on this phone; show it to the office.',
    refused: 'The server did not accept this walk ({{message}}). It stays on this phone; show it to the office.',
    conflictOutline:
      'The office already has a different field outline with the same id. Nothing was deleted: it stays on this phone; show it to the office.',
    refusedOutline: 'The server did not accept this field outline ({{message}}). It stays on this phone; show it to the office.',
    lastError: 'Last try: {{message}}',
    sentAt: 'Sent {{time}}',
    sentWalk: 'The signal is back: the walk of {{fields}} reached the office.',
    sentOutline: 'The signal is back: the field outline of {{fields}} reached the office.',
    sentNow: 'The signal is back: {{what}} reached the office ({{fields}}).',
    sentOk: 'OK',
    plants_one: '{{count}} plant',
    plants_other: '{{count}} plants',
  },
  today: {
    title: "Today's walks",
    search: 'Search by field name',
    clearSearch: 'Clear',
    empty: 'No walks planned for today yet',
    emptyHint: 'Walks the office plans for you will appear here.',
    noMatch: 'No field matches “{{q}}”.',
    allOpen: 'Nothing is assigned to you, so these are all open plantings of the organisation.',
    inProgress: 'Walks in progress',
    continue: 'Continue',
    plantsDone_one: '{{count}} of {{total}} plants measured',
    plantsDone_other: '{{count}} of {{total}} plants measured',
    daysSinceSeeding_one: '{{count}} day since seeding',
    daysSinceSeeding_other: '{{count}} days since seeding',
    assigned: 'Assigned to you',
    notWalked: 'Not walked yet',
    walk: {
      draft: 'Walk started {{date}}',
      submitted: 'Walk sent {{date}}',
      approved: 'Walk approved {{date}}',
      rejected: 'Walk rejected {{date}}',
    },
    rejectReason: 'Reason: {{reason}}',
    cached: 'Shown from this phone; updated when there is signal.',
    loadError: 'Could not load the list.',
    units: 'Your units: {{units}}',
    caution: 'Field estimates are screening figures; the local rule and your adviser decide what is reported.',
    open: 'Open the walk plan for {{field}}',
    sent: 'Recently sent',
    groupAssigned: 'Assigned to you',
    groupOther: 'Other open plantings',
    waitingToSend: 'Waiting to send',
  },
  // The office's English crop names, so both sides name crops alike.
  crops: { ...CROP_LABELS },
  errors: {
    title: 'Something went wrong',
    retry: 'Try again',
    notFound: 'This page does not exist.',
    backToToday: "Back to today's walks",
    network: 'No connection to the server.',
    badResponse: 'The server sent an answer this app does not understand.',
    generic: 'The request did not succeed.',
    status401: 'Please sign in again.',
    status403: 'You are not allowed to do that.',
    status404: 'Not found.',
    status429: 'Too many attempts; wait a minute and try again.',
    status500: 'The server had a problem; try again shortly.',
    screenFailed: 'This screen could not load. With no signal, open it once with signal first.',
  },
};

type Strings<T> = { [K in keyof T]: T[K] extends string ? string : Strings<T[K]> };
/** The shape every language must fill. */
export type Resources = Strings<typeof en>;
