"""Rillscale API client (standard library only)."""
from rillscale.client import ApiError, Client, JobFailed, order_table, write_csv
from rillscale.webhooks import WebhookVerificationError, verify_webhook

__all__ = ["ApiError", "Client", "JobFailed", "order_table", "write_csv", "verify_webhook", "WebhookVerificationError"]
__version__ = "0.1.0"
