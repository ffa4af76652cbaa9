package dev.watcher.model;

/**
 * A notification channel as the rules file (or a quick option) declares it. The rules stage parses it;
 * the notify stage delivers through it.
 */
public sealed interface ChannelSpec permits WebhookSpec, MailSpec {
    /** The name notices address it by. */
    String name();
}
