// Version of the tracing core, stored with every result so numbers from an older core can be told apart.
// Bump it with any change that can move a figure by more than its standard error.
export const ENGINE_VERSION = '1.1.0'
