package dev.watcher.notify;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.model.Notice;
import dev.watcher.model.NoticeKind;
import io.vertx.core.json.JsonObject;
import java.net.URI;
import java.nio.charset.StandardCharsets;
import java.time.OffsetDateTime;
import java.time.format.DateTimeFormatter;
import org.junit.jupiter.api.Test;

class NoticeFormatTest {

    private final Notice notice = Notices.blowup("n-42", "ops");

    @Test
    void cloudEventHasTheRequiredAttributesOfCloudEvents10() {
        // CloudEvents 1.0 spec, "Required Attributes": id, source (URI-reference), specversion "1.0", type,
        // each a non-empty string; "time" must be RFC 3339; the JSON format puts the payload under "data"
        JsonObject ce = new JsonObject(new String(NoticeFormat.body(NoticeFormat.CLOUDEVENTS, notice),
                StandardCharsets.UTF_8));
        assertEquals("1.0", ce.getString("specversion"));
        assertEquals("n-42", ce.getString("id"));
        assertFalse(ce.getString("source").isEmpty());
        URI.create(ce.getString("source"));
        assertEquals("dev.watcher.notice.opened", ce.getString("type"));
        assertEquals("hx-header-07", ce.getString("subject"));
        assertEquals("application/json", ce.getString("datacontenttype"));
        OffsetDateTime.parse(ce.getString("time"), DateTimeFormatter.ISO_OFFSET_DATE_TIME);
        assertEquals("n-42", ce.getJsonObject("data").getString("notice_id"));
        assertEquals("application/cloudevents+json; charset=utf-8", NoticeFormat.contentType("cloudevents"));
    }

    @Test
    void sourceOfARunWithSpacesIsStillAUriReference() {
        Notice n = new Notice("n-1", "roof array 3", "ops", NoticeKind.RESOLVED, notice.severity(), null,
                "cleared", null, notice.detections(), null, Notices.CREATED, 10);
        JsonObject ce = NoticeFormat.cloudEvent(n);
        assertEquals("/watcher/runs/roof%20array%203", URI.create(ce.getString("source")).toString());
        assertEquals("dev.watcher.notice.resolved", ce.getString("type"));
    }

    @Test
    void nativeBodyCarriesRunPatternSeverityRemedyEvidenceAndLastValues() {
        JsonObject o = NoticeFormat.nativeJson(notice);
        assertEquals("hx-header-07", o.getString("run"));
        assertEquals("single-equation-blowup", o.getString("pattern"));
        assertEquals("critical", o.getString("severity"));
        assertEquals("opened", o.getString("kind"));
        assertTrue(o.getString("remedy").contains("under-relaxation"));
        assertEquals(38.5, o.getJsonObject("evidence").getDouble("growth_per_100_iter"));
        assertEquals("k", o.getJsonArray("equations").getString(0));
        assertEquals(0.42, o.getJsonObject("last_values").getDouble("k"));
        assertEquals(1, o.getJsonArray("detections").size());
        assertEquals("n-42", o.getString("notice_id"));
    }

    @Test
    void textBodyIsASingleTextFieldForChatServices() {
        JsonObject o = new JsonObject(new String(NoticeFormat.body(NoticeFormat.TEXT, notice), StandardCharsets.UTF_8));
        assertEquals(1, o.size());
        assertTrue(o.getString("text").startsWith("[critical] hx-header-07: single-equation-blowup"));
        assertTrue(o.getString("text").contains("Remedy: Lower the under-relaxation"));
    }

    @Test
    void mailSubjectSaysSeverityRunAndPatternAndBodyHoldsTheDetails() {
        assertEquals("[critical] hx-header-07: single-equation-blowup", NoticeFormat.subject(notice));
        String body = NoticeFormat.mailBody(notice);
        assertTrue(body.contains("Summary: k residual rose 38x"));
        assertTrue(body.contains("Remedy: Lower the under-relaxation of k"));
        assertTrue(body.contains("growth_per_100_iter: 38.5"));
        assertTrue(body.contains("outlet-temperature: 341.700"));
        assertTrue(body.contains("Notice id: n-42"));
    }

    @Test
    void nonFiniteEvidenceBecomesWordsSoTheBodyStaysJson() {
        java.util.Map<String, Object> ev = new java.util.LinkedHashMap<>();
        ev.put("value", Double.NaN);
        assertEquals("NaN", NoticeFormat.finite(ev).getString("value"));
    }

    @Test
    void unknownBodyStyleIsRefused() {
        assertThrows(IllegalArgumentException.class, () -> NoticeFormat.bodyStyle("xml"));
        assertEquals("native", NoticeFormat.bodyStyle(null));
    }
}
