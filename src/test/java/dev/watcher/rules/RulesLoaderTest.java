package dev.watcher.rules;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.InputFileException;
import dev.watcher.model.MailSpec;
import dev.watcher.model.Patterns;
import dev.watcher.model.Severity;
import dev.watcher.model.StopGate;
import dev.watcher.model.WebhookSpec;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.time.Instant;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * The rules file reader on the shipped files and on each kind of mistake. The expected positions are
 * counted by hand in the texts below (line and column from 1, as editors show them).
 */
class RulesLoaderTest {

    private static String resource(String path) throws IOException {
        try (InputStream in = RulesLoaderTest.class.getClassLoader().getResourceAsStream(path)) {
            assertTrue(in != null, path + " on the classpath");
            return new String(in.readAllBytes(), StandardCharsets.UTF_8);
        }
    }

    private static InputFileException failure(String text) {
        return assertThrows(InputFileException.class, () -> RulesLoader.load("my.yaml", text, RuleSet.empty()));
    }

    private static void assertAt(InputFileException e, int line, int column, String expectedFragment) {
        assertEquals("my.yaml", e.file(), e.getMessage());
        assertEquals(line, e.line(), e.getMessage());
        assertEquals(column, e.column(), e.getMessage());
        assertTrue(e.expected().contains(expectedFragment), e.getMessage());
        assertTrue(e.getMessage().startsWith("my.yaml:" + line + ":" + column + ": "), e.getMessage());
    }

    @Test
    void shippedDefaultLoadsAndCoversEveryPattern() {
        RuleSet d = RulesLoader.defaults();
        for (String id : Patterns.ALL) {
            assertTrue(d.patterns().containsKey(id), "default rules say something about " + id);
            assertTrue(d.rule(id).severity() != null, "default severity for " + id);
        }
        assertTrue(d.channels().isEmpty());
        assertTrue(d.delivery().outrank());
        assertEquals(Duration.ofSeconds(10), d.delivery().gather());
    }

    @Test
    void defaultAllowsStopsOnlyForNonFiniteAndConfirmedBlowUpOrDivergence() {
        // the stop allowance of issue 5: non-finite, and a confirmed single-equation-blowup or family-divergence
        RuleSet d = RulesLoader.defaults();
        for (String id : Patterns.ALL) {
            boolean expected = id.equals(Patterns.NON_FINITE) || id.equals(Patterns.SINGLE_EQUATION_BLOWUP)
                    || id.equals(Patterns.FAMILY_DIVERGENCE);
            assertEquals(expected, d.rule(id).stop().isAllowed(), id);
        }
        StopGate confirmed = d.rule(Patterns.FAMILY_DIVERGENCE).stop().gate();
        assertEquals(new StopGate(20, Duration.ofSeconds(30), Duration.ofMinutes(2), Duration.ofMinutes(1)),
                confirmed);
        assertEquals(new StopGate(1, Duration.ZERO, Duration.ZERO, Duration.ZERO),
                d.rule(Patterns.NON_FINITE).stop().gate());
    }

    @Test
    void defaultTextOnTheClasspathIsTheRepositoryFile() throws IOException {
        assertEquals(resource("rules/default.yaml"), RulesLoader.defaultText());
        assertTrue(RulesLoader.defaultText().startsWith("#"));
    }

    @Test
    void teamWebhookExampleDeclaresItsChannelsWithSecretsFromFilesAndEnvironment() throws Exception {
        RuleSet r = RulesLoader.load("team-webhook.yaml", resource("rules/examples/team-webhook.yaml"),
                RulesLoader.defaults());
        assertEquals(List.of("team-chat", "cfd-list", "dashboard"), r.channels().stream().map(c -> c.name()).toList());
        WebhookSpec chat = (WebhookSpec) r.channels().get(0);
        assertEquals("~/.watcher/team-chat-url", chat.url().file());
        assertNull(chat.url().literal());
        assertEquals("text", chat.body());
        assertEquals(Duration.ofMinutes(5), chat.maxBackoff());
        MailSpec mail = (MailSpec) r.channels().get(1);
        assertEquals("WATCHER_SMTP_PASSWORD", mail.password().env());
        assertEquals(List.of("cfd-oncall@example.org", "lab-lead@example.org"), mail.to());
        assertEquals("required", mail.starttls());
        WebhookSpec dash = (WebhookSpec) r.channels().get(2);
        assertEquals("https://dashboard.example.org/hooks/watcher", dash.url().literal());
        assertEquals("cloudevents", dash.body());
        assertEquals(Severity.CRITICAL, r.floor("cfd-list"));
        assertEquals(Severity.INFO, r.floor("dashboard"));
        // extends the default: its remedies and stop allowances are still there
        assertTrue(r.rule(Patterns.FAMILY_DIVERGENCE).remedy().contains("first-order upwind"));
        assertTrue(r.rule(Patterns.NON_FINITE).stop().isAllowed());
        assertEquals(List.of("dashboard", "team-chat"), r.routes(Patterns.CONVERGED));
        assertEquals(Duration.ofHours(3), r.delivery().remindEvery());
    }

    @Test
    void overnightExampleTightensTheGateAndAllowsAStopForALongStall() throws Exception {
        RuleSet r = RulesLoader.load("overnight-stop.yaml", resource("rules/examples/overnight-stop.yaml"),
                RulesLoader.defaults());
        StopRule blow = r.rule(Patterns.SINGLE_EQUATION_BLOWUP).stop();
        assertTrue(blow.isAllowed(), "still allowed: the default's `allowed` is kept");
        assertEquals(new StopGate(50, Duration.ofMinutes(2), Duration.ofMinutes(15), Duration.ofMinutes(5)),
                blow.gate());
        assertEquals(Severity.CRITICAL, blow.threshold());
        StopRule stall = r.rule(Patterns.STALLED_OSCILLATION).stop();
        assertTrue(stall.isAllowed());
        assertEquals(Severity.WARNING, stall.threshold());
        assertEquals(Duration.ZERO, r.delivery().remindEvery());
        assertEquals(1, r.quiet().size());
        assertEquals(Instant.parse("2026-12-02T01:00:00Z"), r.quiet().get(0).from());
    }

    @Test
    void knownOscillatingExampleMutesAndTunesOnlyTheMatchingRuns() throws Exception {
        RuleSet r = RulesLoader.load("known.yaml", resource("rules/examples/known-oscillating-case.yaml"),
                RulesLoader.defaults());
        RuleSet coarse = r.forRun("header-coarse-a");
        assertEquals("800", coarse.detectorOverrides().get("stalled-oscillation.window"));
        assertTrue(coarse.quiet().stream().anyMatch(q -> q.mutes("header-coarse-a", Patterns.STALLED_OSCILLATION,
                Instant.EPOCH, Instant.EPOCH)));
        assertEquals(Duration.ofMinutes(2), coarse.rule(Patterns.FAMILY_DIVERGENCE).hold());
        assertTrue(coarse.rule(Patterns.FAMILY_DIVERGENCE).remedy().contains("first-order"),
                "a per-run override keeps the rest of the rule");
        RuleSet fine = r.forRun("header-fine");
        assertFalse(fine.detectorOverrides().containsKey("stalled-oscillation.window"));
        assertEquals(Severity.INFO, fine.rule(Patterns.STALLED_OSCILLATION).severity());
        assertEquals(List.of(), fine.routes(Patterns.STALLED_OSCILLATION));
        RuleSet other = r.forRun("tunnel-fan");
        assertEquals(Severity.WARNING, other.rule(Patterns.STALLED_OSCILLATION).severity());
        assertTrue(other.quiet().isEmpty());
        assertEquals(coarse, coarse.forRun("header-coarse-a"), "applying the run overrides twice changes nothing");
    }

    @Test
    void fileWithoutExtendsReplacesTheBase() throws Exception {
        String text = "kind: rules\npatterns:\n  stalled-oscillation:\n    severity: critical\n";
        RuleSet r = RulesLoader.load("my.yaml", text, RulesLoader.defaults());
        assertEquals(Severity.CRITICAL, r.rule(Patterns.STALLED_OSCILLATION).severity());
        assertNull(r.rule(Patterns.STALLED_OSCILLATION).remedy(), "nothing of the default is left");
        assertFalse(r.rule(Patterns.NON_FINITE).stop().isAllowed(), "stopping is opt-in: not allowed unless said");
        assertEquals(Delivery.BUILT_IN, r.delivery());
    }

    @Test
    void fileThatExtendsLaysItsFieldsOverTheBase() throws Exception {
        String text = "kind: rules\nextends: default\npatterns:\n  stalled-oscillation:\n    severity: critical\n"
                + "tune:\n  converged:\n    residual_target: 1e-5\n";
        RuleSet r = RulesLoader.load("my.yaml", text, RulesLoader.defaults());
        assertEquals(Severity.CRITICAL, r.rule(Patterns.STALLED_OSCILLATION).severity());
        assertTrue(r.rule(Patterns.STALLED_OSCILLATION).remedy().contains("relaxation factor"));
        assertTrue(r.rule(Patterns.NON_FINITE).stop().isAllowed());
        assertEquals("1e-5", r.detectorOverrides().get("converged.residual_target"));
    }

    @Test
    void durationsAreWrittenWithUnits() {
        assertEquals(Duration.ofMinutes(90), RulesLoader.parseDuration("1h30m"));
        assertEquals(Duration.ofMillis(500), RulesLoader.parseDuration("500ms"));
        assertEquals(Duration.ofDays(2), RulesLoader.parseDuration("2d"));
        assertEquals(Duration.ZERO, RulesLoader.parseDuration("0"));
        assertNull(RulesLoader.parseDuration("5 mins"));
        assertNull(RulesLoader.parseDuration("5"));
        assertNull(RulesLoader.parseDuration("m"));
        assertNull(RulesLoader.parseDuration(""));
    }

    // ---- errors, each with its position

    @Test
    void unknownPatternIdIsNamedWithItsPosition() {
        InputFileException e = failure("kind: rules\npatterns:\n  single-eqn-blowup:\n    severity: warning\n");
        assertAt(e, 3, 3, "pattern id");
        assertTrue(e.expected().contains("single-eqn-blowup"));
    }

    @Test
    void unknownChannelIsNamedWithItsPosition() {
        InputFileException e = failure("kind: rules\ndelivery:\n  send-to: [ops, all]\n");
        assertAt(e, 3, 13, "declared channel");
        assertTrue(e.expected().contains("`ops`"));
    }

    @Test
    void badDurationIsNamedWithItsPosition() {
        InputFileException e = failure("kind: rules\ndelivery:\n  hold: 5 mins\n");
        assertAt(e, 3, 9, "a duration such as");
        assertTrue(e.expected().contains("5 mins"));
    }

    @Test
    void badSeverityIsNamedWithItsPosition() {
        InputFileException e = failure("kind: rules\npatterns:\n  rising-peaks:\n    severity: urgent\n");
        assertAt(e, 4, 15, "info, warning or critical");
    }

    @Test
    void unknownKeyIsNamedWithItsPosition() {
        InputFileException e = failure("kind: rules\npatterns:\n  rising-peaks:\n    severty: critical\n");
        assertAt(e, 4, 5, "unknown key `severty`");
    }

    @Test
    void fileMustStartWithKindRules() {
        assertAt(failure("patterns: {}\nkind: rules\n"), 1, 1, "`kind: rules` as the first key");
        assertAt(failure("kind: format\n"), 1, 7, "`rules`");
    }

    @Test
    void extendingNeedsABaseAndOnlyTheDefault() {
        assertAt(failure("kind: rules\nextends: mine\n"), 2, 10, "`default`");
        InputFileException e = assertThrows(InputFileException.class,
                () -> RulesLoader.load("my.yaml", "kind: rules\nextends: default\n", null));
        assertAt(e, 2, 10, "default rules to extend");
    }

    @Test
    void repeatedKeyIsAnError() {
        assertAt(failure("kind: rules\ndelivery:\n  hold: 5s\n  hold: 6s\n"), 4, 3, "`hold` appears again");
    }

    @Test
    void signingSecretIsNeverInline() {
        String text = "kind: rules\nchannels:\n  - name: hook\n    webhook:\n      url: http://127.0.0.1:9/x\n"
                + "      secret: abc\n";
        assertAt(failure(text), 6, 7, "unknown key `secret`");
    }

    @Test
    void quietWindowNeedsATimeWindowAndAValidDate() {
        assertAt(failure("kind: rules\nquiet:\n  - patterns: [log-silent]\n"), 3, 5, "a time window");
        assertAt(failure("kind: rules\nquiet:\n  - from: tonight\n"), 3, 11, "2026-12-01T22:00:00Z");
        assertAt(failure("kind: rules\nquiet:\n  - patterns: [log-silent, nope]\n    for: 1h\n"), 3, 28,
                "pattern id");
    }

    @Test
    void brokenYamlIsReportedWithAPosition() {
        InputFileException e = failure("kind: rules\npatterns: [a\n");
        assertEquals("my.yaml", e.file());
        assertTrue(e.line() >= 2, e.getMessage());
        assertTrue(e.expected().startsWith("well-formed YAML"), e.getMessage());
    }

    @Test
    void tuneValuesMustBeSingleValues() {
        assertAt(failure("kind: rules\ntune:\n  converged:\n    Residual-Target: 1e-5\n"), 4, 5, "lower_snake_case");
        assertAt(failure("kind: rules\ntune:\n  converged:\n    residual_target: [1, 2]\n"), 4, 22, "a single value");
    }
    @Test
    void channelNeedsExactlyOneKindAndMailNeedsAPasswordSourceBesideAUser() {
        assertAt(failure("kind: rules\nchannels:\n  - name: x\n    floor: warning\n"), 3, 5,
                "exactly one of `webhook` or `mail`");
        String mail = "kind: rules\nchannels:\n  - name: m\n    mail:\n      host: 127.0.0.1\n      user: bob\n"
                + "      from: a@b.c\n      to: c@d.e\n";
        assertAt(failure(mail), 6, 13, "`password-file` or `password-env`");
        assertAt(failure(mail.replace("      user: bob\n", "      port: 70000\n")), 6, 13, "between 1 and 65535");
        assertAt(failure(mail.replace("      user: bob\n", "").replace("to: c@d.e", "to: nobody")), 7, 11,
                "a mail address");
    }

    @Test
    void channelNamesFromTheBaseCountOnlyWhenExtending() throws Exception {
        RuleSet base = RulesLoader.load("base.yaml", "kind: rules\nchannels:\n  - name: ops\n    webhook:\n"
                + "      url-env: OPS_HOOK\n", null);
        String user = "kind: rules\nextends: default\npatterns:\n  converged: {send-to: [ops]}\n";
        RuleSet r = RulesLoader.load("my.yaml", user, base);
        assertEquals(List.of("ops"), r.routes(Patterns.CONVERGED));
        assertEquals("OPS_HOOK", ((WebhookSpec) r.channels().get(0)).url().env());
        InputFileException e = assertThrows(InputFileException.class,
                () -> RulesLoader.load("my.yaml", user.replace("extends: default\n", ""), base));
        assertAt(e, 3, 25, "declared channel");
    }

    @Test
    void emptyFileSaysWhatItMisses() {
        assertAt(failure(""), 1, 1, "`kind: rules`");
    }
}
