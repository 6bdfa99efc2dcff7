// The header a route uses to declare its body's byte length. Next 16 drops Content-Length from every
// route-handler answer (server/send-response.js) and sends it chunked; our web process (scripts/web-server.ts)
// turns this header back into Content-Length, so downloads show progress and clients can check completeness.
export const BODY_LENGTH_HEADER = "x-rillscale-body-length";
