import nextVitals from "eslint-config-next/core-web-vitals";
import nextTs from "eslint-config-next/typescript";

const config = [
  ...nextVitals,
  ...nextTs,
  { ignores: [".next/**", ".next-test/**", ".data/**", "node_modules/**", "next-env.d.ts", "db/migrations/**", ".scratch/**", "test-results/**"] },
];

export default config;
