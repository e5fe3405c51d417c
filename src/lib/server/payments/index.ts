// Payments: card payments through Stripe Checkout (or the local fake), counter payments, refunds
// and the webhook. Import as a namespace: `import * as payments from '$lib/server/payments'`.
export { customerState, dueNow, startCheckout } from './checkout';
export { counterSchema, recordCounterPayment, refund, refundSchema, sendBalanceLink, type CounterInput, type RefundInput } from './desk';
export { summaryFor, summaryJson } from './ledger';
export { METHOD_LABELS } from './mail';
export { KIND_LABELS, STATUS_LABELS, exportCsv, flaggedForShop, listForJob, listForShop, parseFilters, refundsForShop, resolveFlag, type Filters, type PaymentRow } from './reports';
export { PaymentsUnavailable, configured, describeApi, isLocalFake } from './stripe';
export { WebhookNotConfigured, WebhookRejected, WebhookRetryLater, handleWebhook } from './webhook';
