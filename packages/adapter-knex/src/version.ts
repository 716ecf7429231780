/** Version of this adapter; part of every cache key, so bump it when the output changes. */
export const ADAPTER_VERSION = '0.1.9';
