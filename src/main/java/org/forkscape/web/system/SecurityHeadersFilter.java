package org.forkscape.web.system;

import jakarta.servlet.FilterChain;
import jakarta.servlet.ServletException;
import jakarta.servlet.http.HttpServletRequest;
import jakarta.servlet.http.HttpServletResponse;
import java.io.IOException;
import java.net.InetAddress;
import java.net.URI;
import java.nio.charset.StandardCharsets;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Set;
import org.springframework.beans.factory.annotation.Value;
import org.springframework.stereotype.Component;
import org.springframework.web.filter.OncePerRequestFilter;

/**
 * Protections every response gets, with no login of its own (a shared deployment puts authentication in
 * front, see README):
 * <ul>
 * <li>a content security policy that lets pages run only this server's scripts and styles, so text from
 *     data (column names, labels) can never become code, plus the usual nosniff, frame and referrer
 *     headers;</li>
 * <li>requests that change something (POST, PUT, DELETE) from a page of another origin are refused, so a
 *     web page elsewhere cannot start runs or upload through the user's browser;</li>
 * <li>while the server listens on the loopback address only (the default), a request must name this
 *     machine in its Host header, which stops other sites from reaching it through DNS rebinding; a
 *     reverse proxy on the same machine that passes its own public name lists it in
 *     {@code forkscape.allowed-hosts}.</li>
 * </ul>
 */
@Component
class SecurityHeadersFilter extends OncePerRequestFilter {
    static final String POLICY = "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data: blob:; "
            + "connect-src 'self'; object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'";
    private static final Set<String> LOOPBACK_NAMES = Set.of("localhost", "127.0.0.1", "[::1]", "::1");
    private static final Set<String> CHANGING = Set.of("POST", "PUT", "PATCH", "DELETE");

    private final boolean loopbackOnly;
    private final Set<String> allowedHosts;

    SecurityHeadersFilter(@Value("${server.address:}") String address,
            @Value("${forkscape.allowed-hosts:}") List<String> allowedHosts) {
        this.loopbackOnly = isLoopback(address);
        Set<String> names = new HashSet<>(LOOPBACK_NAMES);
        allowedHosts.stream().map(h -> h.strip().toLowerCase(Locale.ROOT)).filter(h -> !h.isEmpty()).forEach(names::add);
        this.allowedHosts = Set.copyOf(names);
    }

    @Override
    protected void doFilterInternal(HttpServletRequest request, HttpServletResponse response, FilterChain chain)
            throws ServletException, IOException {
        addHeaders(response);
        String host = request.getHeader("Host");
        if (loopbackOnly && host != null && !allowedHosts.contains(hostName(host))) {
            refuse(response, "this server answers only requests addressed to localhost");
            return;
        }
        // without an Origin header (some clients leave it out), a Referer names the page that sent the request
        String origin = request.getHeader("Origin");
        String referer = request.getHeader("Referer");
        String sender = origin != null ? origin : referer;
        if (CHANGING.contains(request.getMethod()) && sender != null && !sameOrigin(sender, host(request, host))) {
            refuse(response, "a page of another site cannot change anything here");
            return;
        }
        chain.doFilter(request, response);
    }

    /** The headers every answer carries, the container's own error reports included. */
    static void addHeaders(HttpServletResponse response) {
        response.setHeader("Content-Security-Policy", POLICY);
        response.setHeader("X-Content-Type-Options", "nosniff");
        response.setHeader("X-Frame-Options", "DENY");
        response.setHeader("Referrer-Policy", "same-origin");
    }

    /** Error dispatches (a method an address does not take, ...) carry the same headers as every answer. */
    @Override
    protected boolean shouldNotFilterErrorDispatch() {
        return false;
    }

    /** The Host header, or (HTTP/1.0 clients) the server name and port the request reached. */
    private static String host(HttpServletRequest request, String header) {
        if (header != null) {
            return header;
        }
        int port = request.getServerPort();
        boolean usual = ("http".equals(request.getScheme()) && port == 80) || ("https".equals(request.getScheme()) && port == 443);
        return usual ? request.getServerName() : request.getServerName() + ":" + port;
    }

    private static void refuse(HttpServletResponse response, String why) throws IOException {
        response.setStatus(HttpServletResponse.SC_FORBIDDEN);
        response.setContentType("text/plain;charset=UTF-8");
        response.getOutputStream().write(("Forbidden: " + why + ".\n").getBytes(StandardCharsets.UTF_8));
    }

    private static boolean sameOrigin(String origin, String host) {
        if (host == null || origin.equals("null")) {
            return false;
        }
        try {
            URI o = URI.create(origin);
            String authority = o.getRawAuthority();
            return authority != null && authority.equalsIgnoreCase(host);
        } catch (IllegalArgumentException e) {
            return false;
        }
    }

    private static String hostName(String host) {
        String h = host.toLowerCase(Locale.ROOT);
        if (h.startsWith("[")) {
            int end = h.indexOf(']');
            return end < 0 ? h : h.substring(0, end + 1);
        }
        int colon = h.lastIndexOf(':');
        return colon < 0 ? h : h.substring(0, colon);
    }

    private static boolean isLoopback(String address) {
        if (address == null || address.isBlank()) {
            return false;
        }
        try {
            return InetAddress.getByName(address).isLoopbackAddress();
        } catch (IOException e) {
            return false;
        }
    }
}
