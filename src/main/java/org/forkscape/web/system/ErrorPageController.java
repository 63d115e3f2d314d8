package org.forkscape.web.system;

import jakarta.servlet.RequestDispatcher;
import jakarta.servlet.http.HttpServletRequest;
import org.springframework.boot.webmvc.error.ErrorController;
import org.springframework.http.HttpStatus;
import org.springframework.stereotype.Controller;
import org.springframework.web.bind.annotation.RequestMapping;

/**
 * The answer to an error the servlet container dispatches (a method the address does not take, a
 * request refused before it reached a controller): the same problem or page as every other failure
 * ({@link ErrorAdvice}), with the security headers. Asked for directly, the address holds nothing.
 */
@Controller
class ErrorPageController implements ErrorController {
    @RequestMapping("${server.error.path:/error}")
    Object error(HttpServletRequest request) {
        Object code = request.getAttribute(RequestDispatcher.ERROR_STATUS_CODE);
        if (!(code instanceof Integer value)) {
            return ErrorAdvice.answer(false, HttpStatus.NOT_FOUND, "", "there is nothing at this address");
        }
        Object uri = request.getAttribute(RequestDispatcher.ERROR_REQUEST_URI);
        boolean api = uri instanceof String path && path.startsWith(request.getContextPath() + "/api/");
        HttpStatus status = HttpStatus.resolve(value);
        if (status == null || !status.isError()) {
            status = HttpStatus.INTERNAL_SERVER_ERROR;
        }
        String message = status.is4xxClientError()
                ? "the request cannot be served as sent (" + status.getReasonPhrase().toLowerCase(java.util.Locale.ROOT) + ")"
                : "internal error; the server log has the details";
        return ErrorAdvice.answer(api, status, "", message);
    }
}
