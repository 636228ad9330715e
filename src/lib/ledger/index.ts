/**
 * The ledger's pure core: RFC 8785 canonical JSON, the record envelope and its sha256, the per-run hash chain with
 * its verification against outside anchors, and uuid v7 ids. No framework, database or Node imports: the browser
 * and the server run the same code. Browser code that only hashes or verifies may import './record' and './chain'
 * directly so that zod (used by './schema') stays out of its bundle.
 */
export * from './jcs';
export * from './record';
export * from './schema';
export * from './chain';
export * from './uuid-v7';
