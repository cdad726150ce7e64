import {
  alternativesQuery,
  alternativesResponse,
  availabilityQuery,
  availabilityResponse,
  errorBody,
} from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import {
  searchAlternatives,
  searchAvailability,
  type AvailabilityDeps,
} from '../domain/availability';

const error = (description: string) => ({ description, schema: errorBody });
const hospitalPeople = { roles: ['buyer', 'clinician'] } as const;

/** `/api/availability`: which units fit a use window at one of the caller's campuses. */
export function availabilityRoutes(deps: AvailabilityDeps, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/availability', 'Availability', catalogue);

  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'Search units for a use window at one of your campuses',
      description:
        'Every active unit of the matching models (`modelId`, `category`, `q`, `compatibleWith`) ' +
        'with the milestones of the requested window, whether it fits, the distance and transit ' +
        'days from its depot, its deposit (the model’s rule) and, when it does not fit, the ' +
        'reason and the earliest first case day within 180 days. A hospital’s first loan of a ' +
        'model gets the longer lead time. Dates are estimates until the lender confirms.',
      access: hospitalPeople,
      query: availabilityQuery,
      responses: {
        200: { description: 'Fitting units first.', schema: availabilityResponse },
        400: error('The query is not valid.'),
        422: error('`invalid_site` (not one of your campuses) or `invalid_window`.'),
      },
    },
    async ({ req, res, query }) => {
      const body = JSON.stringify(await searchAvailability(deps, currentAuth(req), query));
      // Answers change with every booking, so no validator: ending the response directly also
      // skips Express's ETag, a hash of the whole (tens of kB) body on every search.
      res.setHeader('Cache-Control', 'no-store');
      res.type('application/json').end(body);
    },
  );

  api.route(
    {
      method: 'get',
      path: '/alternatives',
      summary: 'Stand-ins for a unit that does not fit',
      description:
        'Units that fit the same window: other units of the same model first, then units of ' +
        'models compatible with it (at most 5). A refused booking (409 `unit_unavailable`) ' +
        'carries the same list in `details.alternatives`.',
      access: hospitalPeople,
      query: alternativesQuery,
      responses: {
        200: { description: 'Fitting stand-ins.', schema: alternativesResponse },
        404: error('No such unit.'),
        422: error('`invalid_site` or `invalid_window`.'),
      },
    },
    async ({ req, res, query }) => {
      res.json({ items: await searchAlternatives(deps, currentAuth(req), query) });
    },
  );
  return api;
}
