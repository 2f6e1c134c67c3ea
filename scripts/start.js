// `npm start`: the production server (adapter-node's build) with Castellan's defaults.
// Photo uploads carry up to 10 photos of 20 MB each, above adapter-node's 512 KB body default.
process.env.BODY_SIZE_LIMIT ??= '220M';
await import('../build/index.js');
