package org.forkscape.web.system;

/**
 * What the JSON API answers when a request cannot be served: the field, JSON path, file or line concerned
 * ({@code ""} when it is about the request as a whole) and the problem in a sentence.
 */
public record Problem(String where, String message) {
}
