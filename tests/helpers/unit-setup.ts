// Shared set-up for unit tests. Component tests opt into a DOM with `// @vitest-environment happy-dom`.
export {};
