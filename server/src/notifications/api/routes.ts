import type { DataSource } from 'typeorm';
import {
  errorBody,
  notificationList,
  notificationParams,
  notificationResponse,
  notificationsQuery,
  outboxList,
  outboxMessageParams,
  outboxMessageResponse,
  outboxQuery,
  readAllResponse,
} from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { requestContext } from '../../identity';
import { listOutbox, resendOutboxMessage } from '../domain/outbox-admin';
import { listNotifications, readAllNotifications, readNotification } from '../domain/in-app';

const error = (description: string) => ({ description, schema: errorBody });

/** `/api/admin/outbox`: the platform admin's view of e-mails waiting, sent and parked. */
export function adminOutboxRoutes(
  dataSource: DataSource,
  now: () => Date,
  catalogue: CatalogueEntry[],
): ApiRouter {
  const api = new ApiRouter('/api/admin/outbox', 'Outbox', catalogue);
  const admin = { roles: ['admin'] } as const;

  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'E-mails in the outbox by status (parked by default), newest first',
      description:
        'Bodies are not shown: invitation and reset e-mails carry one-time links. ' +
        '`before` pages back by id.',
      access: admin,
      query: outboxQuery,
      responses: {
        200: { description: 'Messages.', schema: outboxList },
        403: error('Not the platform admin.'),
      },
    },
    async ({ res, query }) => {
      res.json({ items: await listOutbox(dataSource, query) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/resend',
      summary: 'Send a parked e-mail again (attempts start from zero; audited)',
      access: admin,
      params: outboxMessageParams,
      responses: {
        200: { description: 'Pending again.', schema: outboxMessageResponse },
        404: error('`outbox_message_not_found`.'),
        409: error('`not_parked`: only parked messages can be sent again.'),
      },
    },
    async ({ req, res, params }) => {
      const message = await resendOutboxMessage(
        dataSource,
        currentAuth(req),
        params.id,
        requestContext(req),
        now(),
      );
      res.json({ message });
    },
  );
  return api;
}

/** `/api/notifications`: the signed-in person's own in-app notifications. */
export function notificationRoutes(
  dataSource: DataSource,
  now: () => Date,
  catalogue: CatalogueEntry[],
): ApiRouter {
  const api = new ApiRouter('/api/notifications', 'Notifications', catalogue);
  const anyone = { authenticated: true } as const;

  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'Your notifications, newest first, with the unread count',
      description: '`unread=true` lists unread ones only; `before` pages back by id.',
      access: anyone,
      query: notificationsQuery,
      responses: { 200: { description: 'Notifications.', schema: notificationList } },
    },
    async ({ req, res, query }) => {
      res.json(await listNotifications(dataSource, currentAuth(req).user.id, query));
    },
  );

  api.route(
    {
      method: 'post',
      path: '/read-all',
      summary: 'Mark all your notifications read',
      access: anyone,
      responses: { 200: { description: 'Done.', schema: readAllResponse } },
    },
    async ({ req, res }) => {
      res.json(await readAllNotifications(dataSource, currentAuth(req).user.id, now()));
    },
  );

  api.route(
    {
      method: 'post',
      path: '/:id/read',
      summary: 'Mark one of your notifications read',
      access: anyone,
      params: notificationParams,
      responses: {
        200: { description: 'Read.', schema: notificationResponse },
        404: error('`notification_not_found`: no such notification of yours.'),
      },
    },
    async ({ req, res, params }) => {
      res.json(await readNotification(dataSource, currentAuth(req).user.id, params.id, now()));
    },
  );
  return api;
}
