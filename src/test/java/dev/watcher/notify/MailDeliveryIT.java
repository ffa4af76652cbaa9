package dev.watcher.notify;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.icegreen.greenmail.configuration.GreenMailConfiguration;
import com.icegreen.greenmail.util.GreenMail;
import com.icegreen.greenmail.util.GreenMailUtil;
import com.icegreen.greenmail.util.ServerSetup;
import dev.watcher.model.MailSpec;
import dev.watcher.model.SecretRef;
import io.vertx.core.Vertx;
import jakarta.mail.Message;
import jakarta.mail.internet.InternetAddress;
import jakarta.mail.internet.MimeMessage;
import java.net.ServerSocket;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Set;
import java.util.concurrent.TimeUnit;
import java.util.stream.Collectors;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Mail delivery through GreenMail, a real SMTP server, on 127.0.0.1. */
class MailDeliveryIT {

    private static final Duration WAIT = Duration.ofSeconds(30);
    private static final List<String> TO = List.of("analyst@example.org", "oncall@example.org");

    @TempDir
    Path dir;

    private Vertx vertx;
    private GreenMail smtp;
    private final List<Dispatcher> dispatchers = new ArrayList<>();
    private final DeliveryOptions fast = DeliveryOptions.defaults().withBaseBackoff(Duration.ofMillis(50))
            .withMaxBackoff(Duration.ofMillis(200)).withTimeout(Duration.ofSeconds(5)).withMaxAttempts(6)
            .withDoneIdsKept(100);

    @BeforeEach
    void up() {
        vertx = Vertx.vertx();
    }

    @AfterEach
    void down() throws Exception {
        // let recording of finished notices end before the worker threads go away
        await().atMost(WAIT).until(() -> dispatchers.stream().allMatch(Dispatcher::settled));
        dispatchers.forEach(Dispatcher::close);
        if (smtp != null) {
            smtp.stop();
        }
        vertx.close().toCompletionStage().toCompletableFuture().get(10, TimeUnit.SECONDS);
    }

    private GreenMail startSmtp(int port, GreenMailConfiguration config) {
        GreenMail g = new GreenMail(new ServerSetup(port, "127.0.0.1", ServerSetup.PROTOCOL_SMTP));
        if (config != null) {
            g.withConfiguration(config);
        }
        g.start();
        return g;
    }

    private Dispatcher dispatcher(MailSpec spec, RecordingSink sink) {
        Dispatcher d = new Dispatcher(vertx, dir.resolve("outbox"), List.of(spec), sink, Clock.systemUTC(), fast);
        dispatchers.add(d);
        return d;
    }

    private static MailSpec mail(int port, String starttls, String user, SecretRef password, int attempts) {
        return new MailSpec("team", "127.0.0.1", port, starttls, user, password, "watcher@cluster.example.org", TO,
                Duration.ofSeconds(5), attempts);
    }

    private static int freePort() throws Exception {
        try (ServerSocket s = new ServerSocket(0, 1, java.net.InetAddress.getLoopbackAddress())) {
            return s.getLocalPort();
        }
    }

    @Test
    void messageArrivesWithShortSubjectEveryRecipientAndTheDetails() throws Exception {
        smtp = startSmtp(0, GreenMailConfiguration.aConfig().withDisabledAuthentication());
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(mail(smtp.getSmtp().getPort(), "off", null, null, 3), sink);
        d.submit(Notices.blowup("m-1", "team"));
        await().atMost(WAIT).until(() -> sink.finished("m-1"));
        assertEquals(List.of("queued", "sent"), sink.states("m-1"));

        assertTrue(smtp.waitForIncomingEmail(10_000, 2));
        MimeMessage[] got = smtp.getReceivedMessages();
        // GreenMail keeps one copy per recipient mailbox
        assertEquals(2, got.length);
        MimeMessage m = got[0];
        assertEquals("[critical] hx-header-07: single-equation-blowup", m.getSubject());
        Set<String> to = Arrays.stream(m.getRecipients(Message.RecipientType.TO))
                .map(a -> ((InternetAddress) a).getAddress()).collect(Collectors.toSet());
        assertEquals(Set.copyOf(TO), to);
        assertEquals("watcher@cluster.example.org", ((InternetAddress) m.getFrom()[0]).getAddress());
        String body = GreenMailUtil.getBody(m).replace("\r\n", "\n");
        assertTrue(body.contains("Summary: k residual rose 38x"), body);
        assertTrue(body.contains("Remedy: Lower the under-relaxation of k"), body);
        assertTrue(body.contains("growth_per_100_iter: 38.5"), body);
        assertTrue(body.contains("k: 0.420000"), body);
        assertEquals("m-1", m.getHeader("X-Watcher-Notice-Id")[0]);
    }

    @Test
    void relayDownThenUpDeliversAfterwards() throws Exception {
        int port = freePort();
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(mail(port, "off", null, null, 60), sink);
        d.submit(Notices.blowup("m-2", "team"));
        await().atMost(WAIT).until(() -> sink.states("m-2").contains("failed"));
        assertTrue(String.valueOf(sink.of("m-2").get(1).fields().get("error")).contains("SMTP 127.0.0.1:" + port));

        smtp = startSmtp(port, GreenMailConfiguration.aConfig().withDisabledAuthentication());
        await().atMost(WAIT).until(() -> sink.finished("m-2"));
        List<String> states = sink.states("m-2");
        assertEquals("sent", states.get(states.size() - 1));
        assertTrue(smtp.waitForIncomingEmail(10_000, 2));
        assertEquals("[critical] hx-header-07: single-equation-blowup", smtp.getReceivedMessages()[0].getSubject());
    }

    @Test
    void logsInWithThePasswordFromAFile() throws Exception {
        smtp = startSmtp(0, GreenMailConfiguration.aConfig().withUser("watcher", "hx-pass-7"));
        Path pw = dir.resolve("smtp.pw");
        Files.writeString(pw, "hx-pass-7\n");
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(mail(smtp.getSmtp().getPort(), "off", "watcher", SecretRef.ofFile(pw.toString()), 3),
                sink);
        d.submit(Notices.blowup("m-3", "team"));
        await().atMost(WAIT).until(() -> sink.finished("m-3"));
        assertEquals(List.of("queued", "sent"), sink.states("m-3"));
        assertTrue(smtp.waitForIncomingEmail(10_000, 2));
    }

    @Test
    void wrongPasswordIsAPermanentReplyAndIsGivenUpAtOnce() throws Exception {
        smtp = startSmtp(0, GreenMailConfiguration.aConfig().withUser("watcher", "hx-pass-7"));
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(mail(smtp.getSmtp().getPort(), "off", "watcher", SecretRef.ofLiteral("wrong"), 5),
                sink);
        d.submit(Notices.blowup("m-4", "team"));
        await().atMost(WAIT).until(() -> sink.finished("m-4"));
        List<String> states = sink.states("m-4");
        assertEquals("gave-up", states.get(states.size() - 1));
        assertEquals(0, smtp.getReceivedMessages().length);
    }

    @Test
    void requiredStartTlsNeverSendsOverAPlainConnection() throws Exception {
        // GreenMail's plain SMTP service does not offer STARTTLS here: "required" must refuse to go on
        smtp = startSmtp(0, GreenMailConfiguration.aConfig().withDisabledAuthentication());
        RecordingSink sink = new RecordingSink();
        Dispatcher d = dispatcher(mail(smtp.getSmtp().getPort(), "required", null, null, 2), sink);
        d.submit(Notices.blowup("m-5", "team"));
        await().atMost(WAIT).until(() -> sink.finished("m-5"));
        List<String> states = sink.states("m-5");
        assertEquals("gave-up", states.get(states.size() - 1));
        assertEquals(0, smtp.getReceivedMessages().length);
    }
}
