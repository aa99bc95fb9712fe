import { lazy } from 'react';
import { BrowserRouter, Route, Routes } from 'react-router-dom';
import { TodayRoute } from '../features/today/routes/today';
import { NotFound } from './route-error';
import { Shell } from './shell';

// Today's walks is the first screen and stays in the main bundle. The other screens load on
// demand (STACK.md 13): the plan brings the walk-plan geometry, the entry brings the estimation
// core. The service worker precaches them all, so they open offline after one visit.
// Declarative routes (not the data router) keep React Router's share of the first load small.
const PlanRoute = lazy(() => import('../features/walk/routes/plan'));
const GuideRoute = lazy(() => import('../features/walk/routes/guide'));
const TraceRoute = lazy(() => import('../features/walk/routes/trace'));
const EntryRoute = lazy(() => import('../features/entry/routes/entry'));
const FinishRoute = lazy(() => import('../features/entry/routes/finish'));
const SentRoute = lazy(() => import('../features/submit/routes/sent'));

export function App() {
  return (
    <BrowserRouter basename="/capture">
      <Routes>
        <Route element={<Shell />}>
          <Route index element={<TodayRoute />} />
          <Route path="plantings/:plantingId" element={<PlanRoute />} />
          <Route path="plantings/:plantingId/trace" element={<TraceRoute />} />
          <Route path="guide" element={<GuideRoute />} />
          <Route path="walks/:walkId" element={<EntryRoute />} />
          <Route path="walks/:walkId/finish" element={<FinishRoute />} />
          <Route path="walks/:walkId/sent" element={<SentRoute />} />
          <Route path="*" element={<NotFound />} />
        </Route>
      </Routes>
    </BrowserRouter>
  );
}

/** Preloads the later screens' code while there is signal (the service worker caches it too). */
export function preloadScreens() {
  void import('../features/walk/routes/plan');
  void import('../features/walk/routes/guide');
  void import('../features/walk/routes/trace');
  void import('../features/entry/routes/entry');
  void import('../features/entry/routes/finish');
  void import('../features/submit/routes/sent');
}
