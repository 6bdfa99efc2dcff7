"""verify_webhook() against the Standard Webhooks reference test vector (svix / standardwebhooks test suites,
from memory; our TypeScript signer reproduces the same value) and against tampering."""
import base64
import hashlib
import hmac
import os
import unittest

from rillscale import WebhookVerificationError, verify_webhook

SECRET = "whsec_MfKQ9r8GKYqrTwjUPD8ILPZIo2LaLaSw"
HEADERS = {"webhook-id": "msg_p5jXN8AQM9LWM0D4loKWxJek", "webhook-timestamp": "1614265330",
           "webhook-signature": "v1,g0hM9SsE+OTPJTGt/tmIKtSyZlE3uFJELVlNIOLJ1OE="}
BODY = b'{"test": 2432232314}'


class VerifyWebhook(unittest.TestCase):
    def test_reference_vector_verifies(self):
        self.assertEqual(verify_webhook(SECRET, HEADERS, BODY, now=1614265330), {"test": 2432232314})

    def test_changed_body_is_refused(self):
        with self.assertRaises(WebhookVerificationError):
            verify_webhook(SECRET, HEADERS, b'{"test": 2432232315}', now=1614265330)

    def test_old_timestamp_is_refused(self):
        with self.assertRaises(WebhookVerificationError):
            verify_webhook(SECRET, HEADERS, BODY, now=1614265330 + 301)

    def test_either_signature_of_a_rotation_overlap_verifies(self):
        other = "whsec_" + base64.b64encode(os.urandom(32)).decode()
        key = base64.b64decode(other[6:])
        mac = base64.b64encode(hmac.new(key, b"msg_p5jXN8AQM9LWM0D4loKWxJek.1614265330." + BODY, hashlib.sha256).digest()).decode()
        both = dict(HEADERS, **{"webhook-signature": "v1," + mac + " " + HEADERS["webhook-signature"]})
        self.assertTrue(verify_webhook(SECRET, both, BODY, now=1614265330))
        self.assertTrue(verify_webhook(other, both, BODY, now=1614265330))


if __name__ == "__main__":
    unittest.main()
