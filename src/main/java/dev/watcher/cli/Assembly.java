package dev.watcher.cli;

import dev.watcher.daemon.RunSpec;
import dev.watcher.model.ChannelSpec;
import dev.watcher.model.InputFileException;
import dev.watcher.model.MailSpec;
import dev.watcher.model.SecretRef;
import dev.watcher.model.WebhookSpec;
import dev.watcher.parse.FormatSpec;
import dev.watcher.parse.Formats;
import dev.watcher.rules.RuleSet;
import dev.watcher.rules.RulesLoader;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * Turns command-line options into validated configuration: runs and their formats, the rules, quick
 * channels. Every problem becomes a {@link Main.UserError} naming the file, line and what was expected.
 */
final class Assembly {

    private Assembly() {
    }

    /** Reads a user's text file, or fails with a message that names it. */
    static String read(Path p, String what) {
        try {
            return Files.readString(p, StandardCharsets.UTF_8);
        } catch (java.nio.file.NoSuchFileException e) {
            throw new Main.UserError(p + ": no such " + what + " file");
        } catch (java.nio.charset.MalformedInputException e) {
            throw new Main.UserError(p + ": the " + what + " file is not UTF-8 text");
        } catch (IOException e) {
            throw new Main.UserError(p + ": cannot read the " + what + " file: " + e.getMessage());
        }
    }

    /** A built-in format by name, or a format file. */
    static FormatSpec format(String nameOrFile) {
        FormatSpec b = Formats.builtIn(nameOrFile);
        if (b != null) {
            return b;
        }
        Path p = Path.of(nameOrFile);
        if (!Files.exists(p)) {
            throw new Main.UserError("--format " + nameOrFile + ": neither a built-in format (jsonl, table) nor an"
                    + " existing format file");
        }
        try {
            return Formats.load(p.toString(), read(p, "format"));
        } catch (InputFileException e) {
            throw new Main.UserError(e.getMessage(), e);
        }
    }

    /** The rules in force: the default rules, or the user's file (replacing or extending them). */
    static RuleSet rules(Path file) {
        RuleSet defaults;
        try {
            defaults = RulesLoader.load("rules/default.yaml", RulesLoader.defaultText(), null);
        } catch (InputFileException e) {
            throw new IllegalStateException("the shipped default rules are invalid: " + e.getMessage(), e);
        }
        if (file == null) {
            return defaults;
        }
        try {
            return RulesLoader.load(file.toString(), read(file, "rules"), defaults);
        } catch (InputFileException e) {
            throw new Main.UserError(e.getMessage(), e);
        }
    }

    /**
     * The runs named by LOG arguments. A LOG may join several files into one run with '+'
     * ({@code residuals.log+monitors.log}); formats apply in order to each run's files.
     */
    static List<RunSpec> runs(List<String> logs, CommonOptions o) {
        List<FormatSpec> formats = new ArrayList<>();
        for (String f : o.formats.isEmpty() ? List.of("jsonl") : o.formats) {
            formats.add(format(f));
        }
        List<List<Path>> groups = new ArrayList<>();
        for (String l : logs) {
            List<Path> g = new ArrayList<>();
            for (String part : l.split("\\+")) {
                if (!part.isBlank()) {
                    g.add(Path.of(part));
                }
            }
            if (g.isEmpty()) {
                throw new Main.UserError("an empty LOG argument");
            }
            groups.add(g);
        }
        if (!o.runs.isEmpty() && o.runs.size() != groups.size()) {
            throw new Main.UserError("--run was given " + o.runs.size() + " time(s) for " + groups.size()
                    + " log(s): give it once per log, in order, or not at all");
        }
        List<String> names = new ArrayList<>();
        for (int i = 0; i < groups.size(); i++) {
            names.add(o.runs.isEmpty() ? runName(groups.get(i).get(0)) : o.runs.get(i));
        }
        if (o.runs.isEmpty()) {
            // a clash between two logs adds the parent folder's name
            Map<String, Integer> seen = new HashMap<>();
            for (String n : names) {
                seen.merge(n, 1, Integer::sum);
            }
            for (int i = 0; i < names.size(); i++) {
                if (seen.get(names.get(i)) > 1) {
                    Path parent = groups.get(i).get(0).toAbsolutePath().getParent();
                    String pn = parent == null || parent.getFileName() == null ? "root" : parent.getFileName().toString();
                    names.set(i, pn + "-" + names.get(i));
                }
            }
        }
        if (Set.copyOf(names).size() != names.size()) {
            throw new Main.UserError("two logs have the same run name " + names + ": name them with --run");
        }
        List<RunSpec> out = new ArrayList<>();
        for (int i = 0; i < groups.size(); i++) {
            List<Path> g = groups.get(i);
            List<FormatSpec> fs = new ArrayList<>();
            for (int j = 0; j < g.size(); j++) {
                fs.add(formats.size() == 1 ? formats.get(0) : formats.get(Math.min(j, formats.size() - 1)));
            }
            out.add(new RunSpec(names.get(i), g, fs));
        }
        return out;
    }

    /** The log's file name up to its last extension. */
    static String runName(Path log) {
        String n = log.getFileName().toString();
        int dot = n.lastIndexOf('.');
        return dot > 0 ? n.substring(0, dot) : n;
    }

    /** The state directory: given, or a folder named after the first run beside the first log. */
    static Path stateDir(CommonOptions o, List<RunSpec> runs, String suffix) {
        if (o.state != null) {
            return o.state;
        }
        Path first = runs.get(0).sources().get(0).toAbsolutePath();
        Path dir = first.getParent();
        return dir.resolve(StateName.of(runs.get(0).name()) + suffix);
    }

    /** Quick channels from the command line. */
    static List<ChannelSpec> quickChannels(ChannelOptions c) {
        List<ChannelSpec> out = new ArrayList<>();
        SecretRef url = null;
        int given = (c.webhook != null ? 1 : 0) + (c.webhookUrlFile != null ? 1 : 0) + (c.webhookUrlEnv != null ? 1 : 0);
        if (given > 1) {
            throw new Main.UserError("give the webhook URL once: --webhook, --webhook-url-file or --webhook-url-env");
        }
        if (c.webhook != null) {
            url = SecretRef.ofLiteral(c.webhook);
        } else if (c.webhookUrlFile != null) {
            if (!Files.isReadable(c.webhookUrlFile)) {
                throw new Main.UserError(c.webhookUrlFile + ": cannot read the webhook URL file");
            }
            url = SecretRef.ofFile(c.webhookUrlFile.toString());
        } else if (c.webhookUrlEnv != null) {
            if (System.getenv(c.webhookUrlEnv) == null) {
                throw new Main.UserError("--webhook-url-env " + c.webhookUrlEnv + ": the variable is not set");
            }
            url = SecretRef.ofEnv(c.webhookUrlEnv);
        }
        if (url != null) {
            if (!Set.of("native", "cloudevents", "text").contains(c.webhookBody)) {
                throw new Main.UserError("--webhook-body " + c.webhookBody + ": expected native, cloudevents or text");
            }
            SecretRef secret = null;
            if (c.webhookSecretFile != null) {
                if (!Files.isReadable(c.webhookSecretFile)) {
                    throw new Main.UserError(c.webhookSecretFile + ": cannot read the webhook secret file");
                }
                secret = SecretRef.ofFile(c.webhookSecretFile.toString());
            }
            out.add(new WebhookSpec("quick-webhook", url, secret, c.webhookBody, Duration.ofSeconds(10), 8,
                    Duration.ofMinutes(10)));
        } else if (c.webhookSecretFile != null) {
            throw new Main.UserError("--webhook-secret-file needs a webhook URL (--webhook, --webhook-url-file or"
                    + " --webhook-url-env)");
        }
        if (!c.mailTo.isEmpty()) {
            if (c.smtp == null) {
                throw new Main.UserError("--mail-to needs --smtp HOST:PORT");
            }
            int colon = c.smtp.lastIndexOf(':');
            int port;
            try {
                port = colon < 0 ? 25 : Integer.parseInt(c.smtp.substring(colon + 1));
            } catch (NumberFormatException e) {
                throw new Main.UserError("--smtp " + c.smtp + ": expected HOST:PORT with a numeric port");
            }
            String host = colon < 0 ? c.smtp : c.smtp.substring(0, colon);
            if (!Set.of("required", "optional", "off").contains(c.starttls)) {
                throw new Main.UserError("--starttls " + c.starttls + ": expected required, optional or off");
            }
            SecretRef pw = null;
            if (c.smtpPasswordFile != null) {
                if (!Files.isReadable(c.smtpPasswordFile)) {
                    throw new Main.UserError(c.smtpPasswordFile + ": cannot read the SMTP password file");
                }
                pw = SecretRef.ofFile(c.smtpPasswordFile.toString());
            }
            String from = c.mailFrom != null ? c.mailFrom : "watcher@" + dev.watcher.daemon.Daemon.hostName();
            out.add(new MailSpec("quick-mail", host, port, c.starttls, c.smtpUser, pw, from, c.mailTo,
                    Duration.ofSeconds(30), 8));
        } else if (c.smtp != null) {
            throw new Main.UserError("--smtp needs --mail-to ADDR");
        }
        return out;
    }

    /**
     * Checks the detector parameters that the rules (their tune sections, per run too) and {@code --set} give:
     * every key must be one a detector reads, and numbers must be numbers.
     */
    static void checkParameters(RuleSet rules, List<RunSpec> runs, Map<String, String> cli) {
        Map<String, String> all = new LinkedHashMap<>(rules.detectorOverrides());
        for (RunSpec r : runs) {
            all.putAll(rules.forRun(r.name()).detectorOverrides());
        }
        List<String> fromRules = dev.watcher.daemon.Pipelines.parameterProblems(all);
        if (!fromRules.isEmpty()) {
            throw new Main.UserError("rules file: " + String.join("; ", fromRules));
        }
        List<String> fromCli = dev.watcher.daemon.Pipelines.parameterProblems(cli);
        if (!fromCli.isEmpty()) {
            throw new Main.UserError("--set: " + String.join("; ", fromCli));
        }
    }

    /** State folder names. */
    static final class StateName {
        private StateName() {
        }

        static String of(String run) {
            return run.replaceAll("[^A-Za-z0-9._-]", "_");
        }
    }
}
