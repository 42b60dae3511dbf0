// Stands in for `server-only` under vitest, where there is no React Server Components bundler to honour it.
export {};
