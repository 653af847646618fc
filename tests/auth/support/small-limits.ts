// Imported first by the rate-limit tests, before lib/env.ts reads the allowances (npm test sets them high).
process.env.RATE_LIMIT_ACCOUNT_FAILURES = "3";
process.env.RATE_LIMIT_ADDRESS_FAILURES = "5";
