package dev.watcher.cli;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import picocli.CommandLine.Option;

/**
 * Quick channels that need no rules file (CONTRACT.md): they add to what the rules say and receive notices
 * of severity warning and above, and their resolved notices. Secrets come from files or the environment,
 * never from the command line.
 */
final class ChannelOptions {

    @Option(names = "--webhook", paramLabel = "URL", description = "POST notices to this URL.")
    String webhook;

    @Option(names = "--webhook-url-file", paramLabel = "FILE",
            description = "Read the webhook URL from a file (for URLs that carry a token).")
    Path webhookUrlFile;

    @Option(names = "--webhook-url-env", paramLabel = "VAR",
            description = "Read the webhook URL from an environment variable.")
    String webhookUrlEnv;

    @Option(names = "--webhook-secret-file", paramLabel = "FILE",
            description = "Sign webhook bodies with HMAC-SHA256 using the secret in this file.")
    Path webhookSecretFile;

    @Option(names = "--webhook-body", paramLabel = "KIND", description = "native (default), cloudevents, or text"
            + " (a {\"text\": ...} body for chat services).")
    String webhookBody = "native";

    @Option(names = "--mail-to", paramLabel = "ADDR", split = ",", description = "Mail notices to these addresses.")
    List<String> mailTo = new ArrayList<>();

    @Option(names = "--mail-from", paramLabel = "ADDR", description = "The sender address (default: watcher@HOST).")
    String mailFrom;

    @Option(names = "--smtp", paramLabel = "HOST:PORT", description = "The SMTP relay for --mail-to.")
    String smtp;

    @Option(names = "--smtp-user", paramLabel = "NAME", description = "SMTP login name.")
    String smtpUser;

    @Option(names = "--smtp-password-file", paramLabel = "FILE", description = "SMTP password, read from a file.")
    Path smtpPasswordFile;

    @Option(names = "--starttls", paramLabel = "MODE", description = "required, optional (default) or off.")
    String starttls = "optional";
}
