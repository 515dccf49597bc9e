import { z } from 'zod';
import { ACCESS } from '../../shared/roles.js';
import type { RouteDef } from '../core/routes.js';
import { AppError } from '../core/app-error.js';
import { parse } from '../core/validate.js';
import type { AppContext } from '../context.js';
import { idOf } from '../core/write-routes.js';
import { bookingInputSchema, bookingRoundSchema } from '../../shared/booking-types.js';
import { cancelBooking, memberBookings, memberOffer, placeBooking, saveRound, startCheckout, type BookingDeps } from './bookings-service.js';
import { handlePaymentEvent } from './payment-events.js';
import { bookingReport, bookingReportExport, nutrientComparison, roundBookingList, roundsList } from './bookings-report.js';

export function bookingDeps(ctx: AppContext): BookingDeps {
  return { db: ctx.db, payments: ctx.payments, mail: { publicUrl: ctx.config.publicUrl, mailFrom: ctx.config.mailFrom } };
}

const exportQuery = z.strictObject({ format: z.enum(['csv', 'xlsx'], { error: 'Choose csv or xlsx' }).default('csv') });

/**
 * `/api/bookings`: members book their own farm's fertiliser (the farm comes from the session,
 * whatever the request says); the treasurer opens rounds and reads bookings against the budget; the
 * planner reads booked against projected nutrients.
 */
export function bookingsRoutes(ctx: AppContext): RouteDef[] {
  const deps = () => bookingDeps(ctx);
  return [
    {
      method: 'get',
      path: '/offer',
      access: ACCESS.myFarm,
      // No round open yet is a normal state: 204 No Content.
      handler: async (req, res) => {
        const offer = await memberOffer(deps(), req.user!.farmId);
        if (offer) res.json(offer);
        else res.status(204).end();
      },
    },
    { method: 'get', path: '/mine', access: ACCESS.myFarm, handler: async (req, res) => res.json(await memberBookings(deps(), req.user!.farmId)) },
    {
      method: 'post',
      path: '/',
      access: ACCESS.myFarm,
      handler: async (req, res) => res.status(201).json(await placeBooking(deps(), req.user!, parse(bookingInputSchema, req.body, 'body'))),
    },
    { method: 'get', path: '/rounds', access: ACCESS.budget, handler: async (_req, res) => res.json(await roundsList(ctx.db)) },
    {
      method: 'put',
      path: '/rounds',
      access: ACCESS.bookingRounds,
      handler: async (req, res) => res.json(await saveRound(deps(), parse(bookingRoundSchema, req.body, 'body'), req.user!.id)),
    },
    { method: 'get', path: '/rounds/:id/report', access: ACCESS.bookingRounds, handler: async (req, res) => res.json(await bookingReport(ctx.db, idOf(req))) },
    {
      method: 'get',
      path: '/rounds/:id/report/export',
      access: ACCESS.bookingRounds,
      handler: async (req, res) => {
        const { format } = parse(exportQuery, req.query, 'query');
        const file = await bookingReportExport(ctx.db, idOf(req), format);
        res.setHeader('Content-Type', file.type);
        res.setHeader('Content-Disposition', `attachment; filename="${file.name}"`);
        res.send(file.body);
      },
    },
    { method: 'get', path: '/rounds/:id/bookings', access: ACCESS.bookingRounds, handler: async (req, res) => res.json(await roundBookingList(ctx.db, idOf(req))) },
    { method: 'get', path: '/rounds/:id/nutrients', access: ACCESS.budget, handler: async (req, res) => res.json(await nutrientComparison(ctx.db, idOf(req))) },
    // Member routes with an id last, so `/rounds` is never taken for a booking id.
    {
      method: 'put',
      path: '/:id',
      access: ACCESS.myFarm,
      handler: async (req, res) => {
        const bookingId = idOf(req);
        res.json(await placeBooking(deps(), req.user!, parse(bookingInputSchema, req.body, 'body'), bookingId));
      },
    },
    { method: 'post', path: '/:id/checkout', access: ACCESS.myFarm, handler: async (req, res) => res.status(201).json(await startCheckout(deps(), req.user!, idOf(req))) },
    { method: 'post', path: '/:id/cancel', access: ACCESS.myFarm, handler: async (req, res) => res.json(await cancelBooking(deps(), req.user!, idOf(req))) },
  ];
}

/** `/api/payments/webhook`: the payment service's events; public, verified by their signature. */
export function paymentsRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'post',
      path: '/webhook',
      access: 'public',
      handler: async (req, res) => {
        if (!ctx.payments) throw new AppError(503, 'payments_unavailable', 'Payments are not set up on this server');
        const raw = Buffer.isBuffer(req.body) ? req.body : Buffer.from('');
        let event;
        try {
          event = ctx.payments.verifyWebhook(raw, req.get('stripe-signature'));
        } catch {
          throw new AppError(400, 'bad_signature', 'The webhook signature does not verify; the event was not recorded');
        }
        res.json(await handlePaymentEvent(bookingDeps(ctx), event));
      },
    },
  ];
}

const sessionParam = z.strictObject({ sessionId: z.string().regex(/^cs_[A-Za-z0-9_]{1,80}$/, 'Not a checkout session id') });

/** The local fake payment service's sessions for admins in development mode (complete or fail a payment). */
export function devPaymentsRoutes(ctx: AppContext): RouteDef[] {
  const fake = () => {
    if (!ctx.fakePayments) throw AppError.notFound('The local fake payment service');
    return ctx.fakePayments;
  };
  return [
    { method: 'get', path: '/status', access: ACCESS.devPayments, handler: (_req, res) => res.json({ available: ctx.config.dev && Boolean(ctx.fakePayments) }) },
    { method: 'get', path: '/', access: ACCESS.devPayments, devOnly: true, handler: (_req, res) => res.json({ sessions: fake().sessions().reverse(), deliveries: fake().deliveries().map(({ eventId, type, status, at }) => ({ eventId, type, status, at })).reverse() }) },
    {
      method: 'post',
      path: '/:sessionId/complete',
      access: ACCESS.devPayments,
      devOnly: true,
      handler: async (req, res) => {
        const { sessionId } = parse(sessionParam, req.params, 'params');
        const d = await fake().complete(sessionId);
        if (!d) throw AppError.conflict('The payment is not open (already completed or failed, or unknown)');
        res.json(d);
      },
    },
    {
      method: 'post',
      path: '/:sessionId/fail',
      access: ACCESS.devPayments,
      devOnly: true,
      handler: async (req, res) => {
        const { sessionId } = parse(sessionParam, req.params, 'params');
        const d = await fake().fail(sessionId);
        if (!d) throw AppError.conflict('The payment is not open (already completed or failed, or unknown)');
        res.json(d);
      },
    },
  ];
}
