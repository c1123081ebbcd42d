"""The demo scenario: invented suppliers and deliveries, loaded through the upload path."""

from server.demo.loader import DemoResult, load_demo

__all__ = ["DemoResult", "load_demo"]
