package dev.watcher.model;

import java.time.Duration;

/**
 * An HTTP endpoint that receives notices by POST.
 *
 * @param url         the endpoint (may carry a token: then from a file or the environment; redacted in logs)
 * @param secret      HMAC-SHA256 signing secret (Standard Webhooks), or null for unsigned
 * @param body        {@code native} (our JSON), {@code cloudevents} (CloudEvents 1.0 envelope) or
 *                    {@code text} ({@code {"text": ...}} for chat services)
 * @param timeout     bound on one attempt
 * @param maxAttempts attempts before giving up (the notice stays recorded as gave-up)
 * @param maxBackoff  cap of the exponential backoff between attempts
 */
public record WebhookSpec(String name, SecretRef url, SecretRef secret, String body, Duration timeout,
        int maxAttempts, Duration maxBackoff) implements ChannelSpec {
}
