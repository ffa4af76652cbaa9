package dev.watcher.model;

import java.time.Duration;
import java.util.List;

/**
 * An SMTP relay and the people who get notices by mail.
 *
 * @param starttls {@code required}, {@code optional} or {@code off}
 * @param user     login name, or null for no authentication
 * @param password the login password (from a file or the environment), or null
 */
public record MailSpec(String name, String host, int port, String starttls, String user, SecretRef password,
        String from, List<String> to, Duration timeout, int maxAttempts) implements ChannelSpec {

    public MailSpec {
        to = to == null ? List.of() : List.copyOf(to);
    }
}
