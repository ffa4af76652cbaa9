package dev.watcher.rules;

import dev.watcher.model.ChannelSpec;
import dev.watcher.model.InputFileException;
import dev.watcher.model.MailSpec;
import dev.watcher.model.Patterns;
import dev.watcher.model.SecretRef;
import dev.watcher.model.Severity;
import dev.watcher.model.WebhookSpec;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.time.Instant;
import java.time.OffsetDateTime;
import java.time.format.DateTimeParseException;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * Reads a rules file (YAML, first key {@code kind: rules}) into a {@link RuleSet}. It does no I/O: the
 * caller passes the file's text (the default's text comes from the classpath, {@link #defaultText()}).
 *
 * <p>A file replaces the rules it is given as {@code base} unless it says {@code extends: default}; then
 * it adds channels, quiet windows and per-run overrides to the base's, and lays what it says about each
 * pattern, delivery and detector parameters over the base's, field by field.
 *
 * <p>Every error names the file, line and column and what was expected there ({@link InputFileException}):
 * an unknown key, an unknown pattern id, a channel name no channel declares, a duration such as
 * {@code 5 mins}, a severity that is none of info, warning, critical. The first error found is thrown.
 * Thread-safe (stateless).
 */
public final class RulesLoader {

    /** Where the shipped default lives, in the repository and on the classpath. */
    public static final String DEFAULT_RESOURCE = "rules/default.yaml";

    private static final Set<String> TOP = keys("kind", "extends", "channels", "delivery", "patterns", "quiet",
            "tune", "runs");
    private static final Set<String> DELIVERY = keys("send-to", "hold", "remind-every", "on-clear", "gather",
            "outrank");
    private static final Set<String> PATTERN = keys("severity", "remedy", "send-to", "hold", "remind-every",
            "on-clear", "stop");
    private static final Set<String> STOP = keys("allowed", "at-severity", "persist-records", "persist-for",
            "min-run-age", "after-restart");
    private static final Set<String> CHANNEL = keys("name", "floor", "webhook", "mail");
    private static final Set<String> WEBHOOK = keys("url", "url-file", "url-env", "secret-file", "secret-env",
            "body", "timeout", "attempts", "backoff-cap");
    private static final Set<String> MAIL = keys("host", "port", "starttls", "user", "password-file",
            "password-env", "from", "to", "timeout", "attempts");
    private static final Set<String> QUIET = keys("patterns", "runs", "from", "until", "for");
    private static final Set<String> RUN = keys("match", "patterns", "mute", "tune", "gather");
    private static final Set<String> BODIES = keys("native", "cloudevents", "text");
    private static final Set<String> STARTTLS = keys("required", "optional", "off");

    private static final Pattern DURATION = Pattern.compile("(\\d+)(ms|s|m|h|d)");
    private static final Pattern PARAM = Pattern.compile("[a-z][a-z0-9_]*");
    private static final Pattern CHANNEL_NAME = Pattern.compile("[A-Za-z0-9][A-Za-z0-9._-]*");
    private static final String DURATION_HINT = "a duration such as 500ms, 90s, 5m, 2h, 1d or 1h30m";

    private RulesLoader() {
    }

    /**
     * Reads one rules file.
     *
     * @param fileName the name to put in error messages (as the user gave it)
     * @param yamlText the file's text
     * @param base     the rules a file with {@code extends: default} builds on (normally the default rules);
     *                 may be null when the file does not extend
     * @throws InputFileException naming file, line, column and what was expected
     */
    public static RuleSet load(String fileName, String yamlText, RuleSet base) throws InputFileException {
        return new Reading(fileName).rules(YamlNode.parse(fileName, yamlText == null ? "" : yamlText), base);
    }

    /** The text of the shipped {@code rules/default.yaml}, read from the classpath. */
    public static String defaultText() {
        try (InputStream in = RulesLoader.class.getClassLoader().getResourceAsStream(DEFAULT_RESOURCE)) {
            if (in == null) {
                throw new IllegalStateException(DEFAULT_RESOURCE + " is not on the classpath");
            }
            return new String(in.readAllBytes(), StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** The shipped default rules. A default that does not load is a build defect, hence unchecked. */
    public static RuleSet defaults() {
        try {
            return load(DEFAULT_RESOURCE, defaultText(), null);
        } catch (InputFileException e) {
            throw new IllegalStateException("the shipped default rules are invalid: " + e.getMessage(), e);
        }
    }

    /** Parses a duration as rules files write it ({@code 90s}, {@code 1h30m}, {@code 0}); null if it is not one. */
    public static Duration parseDuration(String text) {
        if (text == null) {
            return null;
        }
        String t = text.trim();
        if (t.equals("0")) {
            return Duration.ZERO;
        }
        Matcher m = DURATION.matcher(t);
        Duration d = Duration.ZERO;
        int at = 0;
        while (at < t.length()) {
            if (!m.find(at) || m.start() != at) {
                return null;
            }
            long n;
            try {
                n = Long.parseLong(m.group(1));
            } catch (NumberFormatException e) {
                return null;
            }
            switch (m.group(2)) {
                case "ms":
                    d = d.plusMillis(n);
                    break;
                case "s":
                    d = d.plusSeconds(n);
                    break;
                case "m":
                    d = d.plusMinutes(n);
                    break;
                case "h":
                    d = d.plusHours(n);
                    break;
                default:
                    d = d.plusDays(n);
                    break;
            }
            at = m.end();
        }
        return at == 0 ? null : d;
    }

    private static Set<String> keys(String... k) {
        return new LinkedHashSet<>(List.of(k));
    }

    /** One reading of one file: carries the name for messages and the references checked at the end. */
    private static final class Reading {
        private final String file;
        private final List<YamlNode> channelRefs = new ArrayList<>();

        Reading(String file) {
            this.file = file;
        }

        InputFileException error(YamlNode at, String expected) {
            return new InputFileException(file, at.line, at.column, expected);
        }

        RuleSet rules(YamlNode root, RuleSet base) throws InputFileException {
            if (!root.isMap()) {
                throw error(root, "a mapping that starts with `kind: rules`, found " + root.describe());
            }
            if (root.entries.isEmpty() || !root.entries.keySet().iterator().next().equals("kind")) {
                throw error(root, "`kind: rules` as the first key");
            }
            YamlNode kind = root.entries.get("kind");
            if (!kind.isScalar() || !kind.text.equals("rules")) {
                throw error(kind, "`rules` as the kind of a rules file, found " + kind.describe());
            }
            checkKeys(root, TOP, "a rules file");
            boolean extend = false;
            YamlNode ext = root.entries.get("extends");
            if (ext != null) {
                if (!ext.isScalar() || !ext.text.equals("default")) {
                    throw error(ext, "`default` (the only rules a file can extend), found " + ext.describe());
                }
                if (base == null) {
                    throw error(ext, "default rules to extend, but none were given");
                }
                extend = true;
            }
            RuleSet start = extend ? base : RuleSet.empty();

            List<ChannelSpec> channels = new ArrayList<>(start.channels());
            Map<String, Severity> floors = new LinkedHashMap<>(start.floors());
            if (root.entries.containsKey("channels")) {
                readChannels(root.entries.get("channels"), channels, floors);
            }
            Delivery delivery = root.entries.containsKey("delivery")
                    ? readDelivery(root.entries.get("delivery"), start.delivery()) : start.delivery();
            Map<String, PatternRule> patterns = new LinkedHashMap<>(start.patterns());
            if (root.entries.containsKey("patterns")) {
                readPatterns(root.entries.get("patterns")).forEach(
                        (id, r) -> patterns.put(id, patterns.getOrDefault(id, PatternRule.UNSET).over(r)));
            }
            List<Quiet> quiet = new ArrayList<>(start.quiet());
            if (root.entries.containsKey("quiet")) {
                for (YamlNode q : list(root.entries.get("quiet"))) {
                    quiet.add(readQuiet(q));
                }
            }
            Map<String, String> tune = new LinkedHashMap<>(start.detectorOverrides());
            if (root.entries.containsKey("tune")) {
                tune.putAll(readTune(root.entries.get("tune")));
            }
            List<RunRule> runs = new ArrayList<>(start.runs());
            if (root.entries.containsKey("runs")) {
                for (YamlNode r : list(root.entries.get("runs"))) {
                    runs.add(readRun(r));
                }
            }
            Set<String> declared = new LinkedHashSet<>();
            channels.forEach(c -> declared.add(c.name()));
            for (YamlNode ref : channelRefs) {
                if (!ref.text.equals(Delivery.ALL) && !declared.contains(ref.text)) {
                    throw error(ref, "the name of a declared channel (" + (declared.isEmpty() ? "none declared"
                            : String.join(", ", declared)) + ", or `all`), found `" + ref.text + "`");
                }
            }
            return new RuleSet(channels, floors, start.everyPattern(), delivery, patterns, quiet, tune, runs);
        }

        // ---- sections

        void readChannels(YamlNode node, List<ChannelSpec> channels, Map<String, Severity> floors)
                throws InputFileException {
            Set<String> seen = new LinkedHashSet<>();
            for (YamlNode c : list(node)) {
                map(c, "a channel: a mapping with `name` and either `webhook` or `mail`");
                checkKeys(c, CHANNEL, "a channel");
                YamlNode nameNode = required(c, "name", "a channel");
                String name = text(nameNode);
                if (!CHANNEL_NAME.matcher(name).matches() || name.equals(Delivery.ALL)) {
                    throw error(nameNode, "a channel name of letters, digits, dots, dashes and underscores"
                            + " (not `all`), found `" + name + "`");
                }
                if (!seen.add(name)) {
                    throw error(nameNode, "a channel name used once in the file, but `" + name + "` appears again");
                }
                YamlNode hook = c.entries.get("webhook");
                YamlNode mail = c.entries.get("mail");
                if ((hook == null) == (mail == null)) {
                    throw error(c, "exactly one of `webhook` or `mail` in channel `" + name + "`");
                }
                ChannelSpec spec = hook != null ? readWebhook(name, hook) : readMail(name, mail);
                channels.removeIf(x -> x.name().equals(name));
                channels.add(spec);
                floors.remove(name);
                if (c.entries.containsKey("floor")) {
                    floors.put(name, severity(c.entries.get("floor")));
                }
            }
        }

        WebhookSpec readWebhook(String name, YamlNode w) throws InputFileException {
            map(w, "the webhook's settings as a mapping");
            checkKeys(w, WEBHOOK, "a webhook");
            SecretRef url = oneSource(w, "url", true, "the webhook's address");
            SecretRef secret = oneSource(w, "secret", false, "the signing secret");
            String body = "native";
            if (w.entries.containsKey("body")) {
                YamlNode b = w.entries.get("body");
                body = text(b);
                if (!BODIES.contains(body)) {
                    throw error(b, "a body of native, cloudevents or text, found `" + body + "`");
                }
            }
            Duration timeout = optDuration(w, "timeout", Duration.ofSeconds(10));
            int attempts = optInt(w, "attempts", 8, 1);
            Duration cap = optDuration(w, "backoff-cap", Duration.ofMinutes(10));
            return new WebhookSpec(name, url, secret, body, timeout, attempts, cap);
        }

        MailSpec readMail(String name, YamlNode m) throws InputFileException {
            map(m, "the mail settings as a mapping");
            checkKeys(m, MAIL, "a mail channel");
            String host = text(required(m, "host", "a mail channel"));
            int port = optInt(m, "port", 587, 1);
            if (port > 65535) {
                throw error(m.entries.get("port"), "a port between 1 and 65535");
            }
            String starttls = "required";
            if (m.entries.containsKey("starttls")) {
                YamlNode s = m.entries.get("starttls");
                starttls = text(s).toLowerCase(Locale.ROOT);
                if (!STARTTLS.contains(starttls)) {
                    throw error(s, "starttls of required, optional or off, found " + s.describe());
                }
            }
            String user = m.entries.containsKey("user") ? text(m.entries.get("user")) : null;
            SecretRef password = oneSource(m, "password", false, "the mail password");
            if (user != null && password == null) {
                throw error(m.entries.get("user"), "`password-file` or `password-env` beside `user`");
            }
            String from = text(required(m, "from", "a mail channel"));
            YamlNode toNode = required(m, "to", "a mail channel");
            List<String> to = new ArrayList<>();
            for (YamlNode t : scalarOrList(toNode)) {
                String addr = text(t);
                if (!addr.contains("@")) {
                    throw error(t, "a mail address, found `" + addr + "`");
                }
                to.add(addr);
            }
            if (to.isEmpty()) {
                throw error(toNode, "at least one recipient");
            }
            Duration timeout = optDuration(m, "timeout", Duration.ofSeconds(30));
            int attempts = optInt(m, "attempts", 6, 1);
            return new MailSpec(name, host, port, starttls, user, password, from, to, timeout, attempts);
        }

        /** {@code stem}, {@code stem-file} or {@code stem-env}; the bare form only when it may be inline. */
        SecretRef oneSource(YamlNode m, String stem, boolean inlineAllowed, String what) throws InputFileException {
            List<SecretRef> found = new ArrayList<>();
            YamlNode last = null;
            if (inlineAllowed && m.entries.containsKey(stem)) {
                last = m.entries.get(stem);
                found.add(SecretRef.ofLiteral(text(last)));
            }
            if (m.entries.containsKey(stem + "-file")) {
                last = m.entries.get(stem + "-file");
                found.add(SecretRef.ofFile(text(last)));
            }
            if (m.entries.containsKey(stem + "-env")) {
                last = m.entries.get(stem + "-env");
                found.add(SecretRef.ofEnv(text(last)));
            }
            if (found.size() > 1) {
                throw error(last, "only one source for " + what);
            }
            if (found.isEmpty()) {
                if (inlineAllowed) {
                    throw error(m, what + ": `" + stem + "`, `" + stem + "-file` or `" + stem + "-env`");
                }
                return null;
            }
            return found.get(0);
        }

        Delivery readDelivery(YamlNode d, Delivery base) throws InputFileException {
            map(d, "the delivery settings as a mapping");
            checkKeys(d, DELIVERY, "the delivery settings");
            List<String> sendTo = d.entries.containsKey("send-to") ? sendTo(d.entries.get("send-to")) : base.sendTo();
            Duration hold = optDuration(d, "hold", base.hold());
            Duration remind = optDuration(d, "remind-every", base.remindEvery());
            boolean onClear = optBool(d, "on-clear", base.onClear());
            Duration gather = optDuration(d, "gather", base.gather());
            boolean outrank = optBool(d, "outrank", base.outrank());
            return new Delivery(sendTo, hold, remind, onClear, gather, outrank);
        }

        Map<String, PatternRule> readPatterns(YamlNode node) throws InputFileException {
            map(node, "pattern ids, each with its settings");
            Map<String, PatternRule> out = new LinkedHashMap<>();
            for (Map.Entry<String, YamlNode> e : node.entries.entrySet()) {
                patternId(node.keyNodes.get(e.getKey()));
                out.put(e.getKey(), readPattern(e.getValue(), e.getKey()));
            }
            return out;
        }

        PatternRule readPattern(YamlNode p, String id) throws InputFileException {
            if (p.isNull()) {
                return PatternRule.UNSET;
            }
            map(p, "the settings of pattern `" + id + "` as a mapping");
            checkKeys(p, PATTERN, "the settings of a pattern");
            Severity severity = p.entries.containsKey("severity") ? severity(p.entries.get("severity")) : null;
            String remedy = p.entries.containsKey("remedy") ? text(p.entries.get("remedy")).strip() : null;
            List<String> sendTo = p.entries.containsKey("send-to") ? sendTo(p.entries.get("send-to")) : null;
            Duration hold = optDuration(p, "hold", null);
            Duration remind = optDuration(p, "remind-every", null);
            Boolean onClear = p.entries.containsKey("on-clear") ? bool(p.entries.get("on-clear")) : null;
            StopRule stop = p.entries.containsKey("stop") ? readStop(p.entries.get("stop")) : StopRule.UNSET;
            return new PatternRule(severity, remedy, sendTo, hold, remind, onClear, stop);
        }

        StopRule readStop(YamlNode s) throws InputFileException {
            if (s.isScalar()) {
                // `stop: false` is short for `stop: {allowed: false}`
                return new StopRule(bool(s), null, null, null, null, null);
            }
            map(s, "the stop settings as a mapping (or true/false)");
            checkKeys(s, STOP, "the stop settings");
            Boolean allowed = s.entries.containsKey("allowed") ? bool(s.entries.get("allowed")) : null;
            Severity at = s.entries.containsKey("at-severity") ? severity(s.entries.get("at-severity")) : null;
            Integer records = s.entries.containsKey("persist-records") ? optInt(s, "persist-records", 0, 0) : null;
            return new StopRule(allowed, at, records, optDuration(s, "persist-for", null),
                    optDuration(s, "min-run-age", null), optDuration(s, "after-restart", null));
        }

        Quiet readQuiet(YamlNode q) throws InputFileException {
            map(q, "a quiet window: a mapping with `patterns`, `runs`, `from`, `until` or `for`");
            checkKeys(q, QUIET, "a quiet window");
            List<String> patterns = new ArrayList<>();
            if (q.entries.containsKey("patterns")) {
                for (YamlNode p : scalarOrList(q.entries.get("patterns"))) {
                    patterns.add(patternId(p));
                }
            }
            List<String> runs = new ArrayList<>();
            if (q.entries.containsKey("runs")) {
                for (YamlNode r : scalarOrList(q.entries.get("runs"))) {
                    runs.add(text(r));
                }
            }
            Instant from = optInstant(q, "from");
            Instant until = optInstant(q, "until");
            Duration lasting = optDuration(q, "for", null);
            if (lasting != null && (from != null || until != null)) {
                throw error(q.keyNodes.get("for"), "either `for` or `from`/`until` in one quiet window, not both");
            }
            if (lasting == null && from == null && until == null) {
                throw error(q, "a time window in the quiet entry: `for` (from the daemon's start) or `from`/`until`");
            }
            if (from != null && until != null && !until.isAfter(from)) {
                throw error(q.entries.get("until"), "an end after the start (" + from + ")");
            }
            return new Quiet(patterns, runs, from, until, lasting);
        }

        Map<String, String> readTune(YamlNode node) throws InputFileException {
            map(node, "pattern ids, each with detector parameters");
            Map<String, String> out = new LinkedHashMap<>();
            for (Map.Entry<String, YamlNode> e : node.entries.entrySet()) {
                patternId(node.keyNodes.get(e.getKey()));
                YamlNode params = e.getValue();
                map(params, "the detector parameters of `" + e.getKey() + "` as a mapping");
                for (Map.Entry<String, YamlNode> p : params.entries.entrySet()) {
                    if (!PARAM.matcher(p.getKey()).matches()) {
                        throw error(params.keyNodes.get(p.getKey()),
                                "a parameter name in lower_snake_case, found `" + p.getKey() + "`");
                    }
                    YamlNode v = p.getValue();
                    if (!v.isScalar()) {
                        throw error(v, "a single value (number, true/false or word) for " + e.getKey() + "."
                                + p.getKey() + ", found " + v.describe());
                    }
                    out.put(e.getKey() + "." + p.getKey(), v.text.trim());
                }
            }
            return out;
        }

        RunRule readRun(YamlNode r) throws InputFileException {
            map(r, "a per-run override: a mapping with `match` and what changes");
            checkKeys(r, RUN, "a per-run override");
            String match = text(required(r, "match", "a per-run override"));
            Map<String, PatternRule> patterns = r.entries.containsKey("patterns")
                    ? readPatterns(r.entries.get("patterns")) : Map.of();
            List<String> mute = new ArrayList<>();
            if (r.entries.containsKey("mute")) {
                for (YamlNode p : scalarOrList(r.entries.get("mute"))) {
                    mute.add(patternId(p));
                }
            }
            Map<String, String> tune = r.entries.containsKey("tune") ? readTune(r.entries.get("tune")) : Map.of();
            return new RunRule(match, patterns, mute, tune, optDuration(r, "gather", null));
        }

        // ---- values

        void checkKeys(YamlNode m, Set<String> allowed, String what) throws InputFileException {
            for (Map.Entry<String, YamlNode> k : m.keyNodes.entrySet()) {
                if (!allowed.contains(k.getKey())) {
                    throw error(k.getValue(), "one of the keys of " + what + " (" + String.join(", ", allowed)
                            + "), found unknown key `" + k.getKey() + "`");
                }
            }
        }

        void map(YamlNode n, String expected) throws InputFileException {
            if (!n.isMap()) {
                throw error(n, expected + ", found " + n.describe());
            }
        }

        List<YamlNode> list(YamlNode n) throws InputFileException {
            if (n.isNull()) {
                return List.of();
            }
            if (!n.isList()) {
                throw error(n, "a list (lines starting with `- `), found " + n.describe());
            }
            return n.items;
        }

        List<YamlNode> scalarOrList(YamlNode n) throws InputFileException {
            if (n.isScalar()) {
                return List.of(n);
            }
            List<YamlNode> items = list(n);
            for (YamlNode i : items) {
                if (!i.isScalar()) {
                    throw error(i, "a single word or value in the list, found " + i.describe());
                }
            }
            return items;
        }

        YamlNode required(YamlNode m, String key, String what) throws InputFileException {
            YamlNode v = m.entries.get(key);
            if (v == null || v.isNull()) {
                throw error(v == null ? m : v, "`" + key + "` in " + what);
            }
            return v;
        }

        String text(YamlNode n) throws InputFileException {
            if (!n.isScalar() || n.text.isBlank()) {
                throw error(n, "a value, found " + n.describe());
            }
            return n.text;
        }

        String patternId(YamlNode n) throws InputFileException {
            String id = text(n);
            if (!Patterns.isKnown(id)) {
                throw error(n, "a pattern id (" + String.join(", ", Patterns.ALL) + "), found unknown `" + id + "`");
            }
            return id;
        }

        Severity severity(YamlNode n) throws InputFileException {
            Severity s = n.isScalar() ? Severity.fromId(n.text) : null;
            if (s == null) {
                throw error(n, "a severity: info, warning or critical, found " + n.describe());
            }
            return s;
        }

        Boolean bool(YamlNode n) throws InputFileException {
            if (n.isScalar()) {
                switch (n.text.trim().toLowerCase(Locale.ROOT)) {
                    case "true":
                    case "yes":
                    case "on":
                        return Boolean.TRUE;
                    case "false":
                    case "no":
                    case "off":
                        return Boolean.FALSE;
                    default:
                        break;
                }
            }
            throw error(n, "true or false, found " + n.describe());
        }

        boolean optBool(YamlNode m, String key, boolean fallback) throws InputFileException {
            return m.entries.containsKey(key) ? bool(m.entries.get(key)) : fallback;
        }

        List<String> sendTo(YamlNode n) throws InputFileException {
            if (n.isScalar() && n.text.equals("none")) {
                return List.of();
            }
            List<String> out = new ArrayList<>();
            for (YamlNode c : scalarOrList(n)) {
                channelRefs.add(c);
                out.add(text(c));
            }
            return out;
        }

        Duration optDuration(YamlNode m, String key, Duration fallback) throws InputFileException {
            YamlNode n = m.entries.get(key);
            if (n == null) {
                return fallback;
            }
            if (n.isScalar() && key.equals("remind-every") && n.text.trim().equals("never")) {
                return Duration.ZERO;
            }
            Duration d = n.isScalar() ? parseDuration(n.text) : null;
            if (d == null) {
                throw error(n, DURATION_HINT + (key.equals("remind-every") ? " (or never)" : "") + ", found "
                        + n.describe());
            }
            return d;
        }

        int optInt(YamlNode m, String key, int fallback, int least) throws InputFileException {
            YamlNode n = m.entries.get(key);
            if (n == null) {
                return fallback;
            }
            try {
                int v = Integer.parseInt(n.isScalar() ? n.text.trim() : "x");
                if (v >= least) {
                    return v;
                }
            } catch (NumberFormatException e) {
                // fall through to the message
            }
            throw error(n, "a whole number of at least " + least + ", found " + n.describe());
        }

        Instant optInstant(YamlNode m, String key) throws InputFileException {
            YamlNode n = m.entries.get(key);
            if (n == null) {
                return null;
            }
            try {
                return OffsetDateTime.parse(text(n).trim()).toInstant();
            } catch (DateTimeParseException e) {
                throw error(n, "a date and time with its offset, such as 2026-12-01T22:00:00Z, found "
                        + n.describe());
            }
        }
    }
}
