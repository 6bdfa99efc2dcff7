"""Verifying Standard Webhooks 1.0 deliveries from Rillscale (HMAC-SHA256 over "{id}.{timestamp}.{body}")."""
import base64
import hashlib
import hmac
import time
from typing import Mapping, Optional, Union

SECRET_PREFIX = "whsec_"
TOLERANCE_SECONDS = 5 * 60


class WebhookVerificationError(Exception):
    pass


def _header(headers: Mapping[str, str], name: str) -> str:
    for k, v in headers.items():
        if k.lower() == name:
            return v
    raise WebhookVerificationError("missing header " + name)


def verify_webhook(secret: str, headers: Mapping[str, str], body: Union[bytes, str], now: Optional[float] = None) -> dict:
    """Checks the signature and timestamp of one delivery and returns the parsed JSON body.

    `body` must be the raw bytes received; `secret` the endpoint's `whsec_...` secret. During a secret
    rotation the delivery carries one signature per secret; any one matching is enough.
    """
    import json

    if not secret.startswith(SECRET_PREFIX):
        raise WebhookVerificationError("the secret must start with whsec_")
    key = base64.b64decode(secret[len(SECRET_PREFIX):])
    raw = body.encode("utf-8") if isinstance(body, str) else body
    msg_id = _header(headers, "webhook-id")
    ts_text = _header(headers, "webhook-timestamp")
    try:
        ts = int(ts_text)
    except ValueError:
        raise WebhookVerificationError("webhook-timestamp is not an integer")
    current = time.time() if now is None else now
    if abs(current - ts) > TOLERANCE_SECONDS:
        raise WebhookVerificationError("the timestamp is outside the five-minute window")
    signed = msg_id.encode("utf-8") + b"." + ts_text.encode("utf-8") + b"." + raw
    expected = hmac.new(key, signed, hashlib.sha256).digest()
    for part in _header(headers, "webhook-signature").split(" "):
        version, _, sig = part.partition(",")
        if version != "v1":
            continue
        try:
            got = base64.b64decode(sig)
        except ValueError:
            continue
        if hmac.compare_digest(got, expected):
            return json.loads(raw.decode("utf-8"))
    raise WebhookVerificationError("no signature matches")
