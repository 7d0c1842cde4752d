import { csrMultiply, type CsrMatrix } from '../linalg/csr.js';
import { InputError } from '../errors.js';
import { centred } from './weights-sums.js';

/**
 * Local Moran statistics (Anselin 1995, eq. 7): I_i = (z_i / m₂) Σⱼ w_ij z_j with z the deviations
 * from the mean and m₂ = Σ z_i² / n. With row-standardised W, Σ I_i / n equals global Moran's I.
 */
export function localMoran(v: Float64Array, w: CsrMatrix): Float64Array {
  const n = v.length;
  if (n !== w.n) throw new InputError(`The variable has ${n} values but the weights cover ${w.n} areas; use one value per area.`);
  const { z, m2 } = centred(v);
  if (!(m2 > 0)) throw new InputError('The variable has the same value in every area, so local Moran statistics are undefined; choose a variable that varies.');
  const wz = csrMultiply(w, z);
  const scale = n / m2;
  return z.map((zi, i) => zi * wz[i] * scale);
}
