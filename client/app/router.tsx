import { createBrowserRouter } from 'react-router-dom';
import { sessionQuery } from '../features/session/api';
import { TodayRoute } from '../features/today/routes/today';
import { queryClient } from './providers';
import { RouteError, NotFound } from './route-error';
import { Loading, Shell } from './shell';

// Today's walks is the first screen and stays in the main bundle; later, rarely used
// screens join here with `lazy` so they load on demand (STACK.md 13).
export const router = createBrowserRouter(
  [
    {
      path: '/',
      // Signed-out visitors are sent to /login by the api client before anything renders.
      loader: () => queryClient.ensureQueryData(sessionQuery),
      element: <Shell />,
      errorElement: <RouteError />,
      hydrateFallbackElement: <Loading />,
      children: [
        { index: true, element: <TodayRoute /> },
        { path: '*', element: <NotFound /> },
      ],
    },
  ],
  { basename: '/capture' },
);
