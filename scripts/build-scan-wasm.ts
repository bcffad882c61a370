/**
 * npm run build:wasm — compiles the import's row scanner (shared/import/wasm/scan-rows.as.ts, AssemblyScript)
 * and writes its bytes into shared/import/wasm/scan-rows-wasm.generated.ts (committed; see shared/import/README.md).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { compileScanWasm, renderGenerated, repoRoot, SCAN_WASM_GENERATED } from './lib/compile-scan-wasm.ts';

const binary = await compileScanWasm();
writeFileSync(join(repoRoot, SCAN_WASM_GENERATED), renderGenerated(binary));
console.log(`${SCAN_WASM_GENERATED}: ${binary.length} bytes of WebAssembly`);
