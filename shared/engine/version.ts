// The engine's version, stored with every run's output and written into exports. Raise it
// when a change alters the numbers a spec gives, so a stored run says which engine made it.
export const ENGINE_VERSION = '0.2.0';
