/**
 * The notify stage: delivers {@link dev.watcher.model.Notice}s to people through webhooks and mail, and never
 * loses one.
 *
 * <pre>
 *  rules ──Notice──▶ Dispatcher.submit ──▶ Outbox (file, fsync) ──▶ Notifier.send (attempt n)
 *                                                                     │
 *                     sent / gave-up ◀── Outcome ◀────────────────────┘
 *                          │               │ retry: Backoff (exponential, jitter, Retry-After)
 *                          ▼               ▼
 *              done-ids + outbox removal   timer ──▶ Notifier.send (attempt n+1)
 *
 *  every outcome ──▶ EventSink (a {@code notice} event: queued, sent, failed, gave-up)
 * </pre>
 *
 * The {@link dev.watcher.notify.Dispatcher} is the only entry point the composition root needs; secrets are
 * resolved through {@link dev.watcher.notify.Secrets} and every URL that reaches a log or the timeline goes
 * through {@link dev.watcher.notify.Redact#url(String)}.
 */
package dev.watcher.notify;
