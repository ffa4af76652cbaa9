package dev.watcher.notify;

import java.nio.charset.StandardCharsets;
import java.security.GeneralSecurityException;
import java.security.MessageDigest;
import java.util.Base64;
import javax.crypto.Mac;
import javax.crypto.spec.SecretKeySpec;

/**
 * Signing per the open Standard Webhooks scheme: the signed content is {@code id.timestamp.body}, the MAC is
 * HMAC-SHA256 with the endpoint's secret, and the header value is {@code v1,<base64 MAC>}. A secret given as
 * {@code whsec_<base64>} is the base64-decoded key; any other secret is used as its UTF-8 bytes.
 *
 * <p>Stateless and thread-safe.
 */
final class Signature {

    static final String HEADER_ID = "webhook-id";
    static final String HEADER_TIMESTAMP = "webhook-timestamp";
    static final String HEADER_SIGNATURE = "webhook-signature";
    private static final String PREFIX = "whsec_";

    private Signature() {
    }

    /** The key bytes of a configured secret ({@code whsec_<base64>} or raw text). */
    static byte[] key(String secret) {
        if (secret.startsWith(PREFIX)) {
            return Base64.getDecoder().decode(secret.substring(PREFIX.length()));
        }
        return secret.getBytes(StandardCharsets.UTF_8);
    }

    /** HMAC-SHA256 of {@code message} under {@code key}. */
    static byte[] hmacSha256(byte[] key, byte[] message) {
        try {
            Mac mac = Mac.getInstance("HmacSHA256");
            mac.init(new SecretKeySpec(key, "HmacSHA256"));
            return mac.doFinal(message);
        } catch (GeneralSecurityException e) {
            // every Java platform must provide HmacSHA256 (javax.crypto.Mac contract)
            throw new IllegalStateException("HmacSHA256 unavailable", e);
        }
    }

    /** The bytes that are signed: {@code id + "." + timestamp + "." + body}. */
    static byte[] signedContent(String id, long timestamp, byte[] body) {
        byte[] head = (id + "." + timestamp + ".").getBytes(StandardCharsets.UTF_8);
        byte[] all = new byte[head.length + body.length];
        System.arraycopy(head, 0, all, 0, head.length);
        System.arraycopy(body, 0, all, head.length, body.length);
        return all;
    }

    /** The {@code webhook-signature} header value for one attempt. */
    static String header(byte[] key, String id, long timestamp, byte[] body) {
        return "v1," + Base64.getEncoder().encodeToString(hmacSha256(key, signedContent(id, timestamp, body)));
    }

    /**
     * Whether a {@code webhook-signature} header (possibly several space-separated signatures) holds a valid
     * v1 signature of the content; compares in constant time.
     */
    static boolean verify(byte[] key, String id, long timestamp, byte[] body, String headerValue) {
        if (headerValue == null) {
            return false;
        }
        byte[] expected = hmacSha256(key, signedContent(id, timestamp, body));
        for (String part : headerValue.trim().split(" ")) {
            if (!part.startsWith("v1,")) {
                continue;
            }
            byte[] given;
            try {
                given = Base64.getDecoder().decode(part.substring(3));
            } catch (IllegalArgumentException e) {
                continue;
            }
            if (MessageDigest.isEqual(expected, given)) {
                return true;
            }
        }
        return false;
    }
}
