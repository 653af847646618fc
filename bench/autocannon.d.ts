// autocannon 9 ships no types; the benchmark uses a small part of its API.
declare module "autocannon";
