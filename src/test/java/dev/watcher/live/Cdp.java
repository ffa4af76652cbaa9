package dev.watcher.live;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.net.http.WebSocket;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CompletionStage;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;

/**
 * A minimal client of the Chrome DevTools Protocol (JSON messages over a WebSocket, as the protocol's own
 * documentation describes): commands with ids and their results, and every console message, uncaught
 * exception and error log entry of the page collected as text.
 */
final class Cdp implements AutoCloseable {

    private static final ObjectMapper JSON = new ObjectMapper();

    private final WebSocket socket;
    private final AtomicLong ids = new AtomicLong();
    private final Map<Long, CompletableFuture<JsonNode>> pending = new ConcurrentHashMap<>();
    final List<String> problems = new CopyOnWriteArrayList<>();
    final List<String> console = new CopyOnWriteArrayList<>();

    private Cdp(WebSocket socket) {
        this.socket = socket;
    }

    /** Connects to the first page target of the browser listening on {@code port} (127.0.0.1). */
    static Cdp connect(int port) throws Exception {
        HttpClient http = HttpClient.newBuilder().connectTimeout(Duration.ofSeconds(5)).build();
        JsonNode targets = JSON.readTree(http.send(HttpRequest.newBuilder(
                URI.create("http://127.0.0.1:" + port + "/json/list")).build(), HttpResponse.BodyHandlers.ofString())
                .body());
        String ws = null;
        for (JsonNode t : targets) {
            if (t.path("type").asText().equals("page")) {
                ws = t.path("webSocketDebuggerUrl").asText();
                break;
            }
        }
        if (ws == null) {
            throw new IllegalStateException("no page target in " + targets);
        }
        Listener listener = new Listener();
        WebSocket socket = http.newWebSocketBuilder().buildAsync(URI.create(ws), listener).get(10, TimeUnit.SECONDS);
        Cdp cdp = new Cdp(socket);
        listener.cdp = cdp;
        cdp.call("Runtime.enable", Map.of());
        cdp.call("Log.enable", Map.of());
        cdp.call("Page.enable", Map.of());
        return cdp;
    }

    JsonNode call(String method, Map<String, Object> params) throws Exception {
        long id = ids.incrementAndGet();
        ObjectNode msg = JSON.createObjectNode();
        msg.put("id", id);
        msg.put("method", method);
        msg.set("params", JSON.valueToTree(params));
        CompletableFuture<JsonNode> f = new CompletableFuture<>();
        pending.put(id, f);
        synchronized (socket) {
            socket.sendText(JSON.writeValueAsString(msg), true).get(10, TimeUnit.SECONDS);
        }
        JsonNode reply = f.get(30, TimeUnit.SECONDS);
        if (reply.has("error")) {
            throw new IllegalStateException(method + ": " + reply.path("error"));
        }
        return reply.path("result");
    }

    /** Evaluates an expression in the page and returns its value as text. */
    String eval(String expression) throws Exception {
        JsonNode r = call("Runtime.evaluate", Map.of("expression", expression, "returnByValue", true));
        if (r.has("exceptionDetails")) {
            throw new IllegalStateException("page threw: " + r.path("exceptionDetails"));
        }
        return r.path("result").path("value").asText();
    }

    private void receive(String text) {
        JsonNode m;
        try {
            m = JSON.readTree(text);
        } catch (Exception e) {
            problems.add("unreadable protocol message: " + text);
            return;
        }
        if (m.has("id")) {
            CompletableFuture<JsonNode> f = pending.remove(m.path("id").asLong());
            if (f != null) {
                f.complete(m);
            }
            return;
        }
        JsonNode p = m.path("params");
        switch (m.path("method").asText()) {
            case "Runtime.consoleAPICalled" -> {
                String line = p.path("type").asText() + ": " + p.path("args");
                console.add(line);
                if (!p.path("type").asText().matches("log|info|debug")) {
                    problems.add("console " + line);
                }
            }
            case "Runtime.exceptionThrown" -> problems.add("exception " + p.path("exceptionDetails"));
            case "Log.entryAdded" -> {
                String level = p.path("entry").path("level").asText();
                if (level.equals("error") || level.equals("warning")) {
                    problems.add("log " + level + ": " + p.path("entry").path("text").asText() + " "
                            + p.path("entry").path("url").asText());
                }
            }
            default -> {
            }
        }
    }

    @Override
    public void close() {
        socket.abort();
    }

    private static final class Listener implements WebSocket.Listener {
        volatile Cdp cdp;
        private final StringBuilder buf = new StringBuilder();

        @Override
        public CompletionStage<?> onText(WebSocket ws, CharSequence data, boolean last) {
            buf.append(data);
            if (last) {
                String text = buf.toString();
                buf.setLength(0);
                cdp.receive(text);
            }
            ws.request(1);
            return null;
        }
    }
}
