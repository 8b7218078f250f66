// Global test setup: an in-memory IndexedDB for store tests (fake-indexeddb), harmless elsewhere.
import 'fake-indexeddb/auto';
