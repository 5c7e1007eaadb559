/** Answers of the Unit file (`/api/units/:id/file`, the refrigerant record, `/api/unit-file`): the contract's own schemas. */
import { refrigerantRecordSchema, unitFileSchema, unitSearchResultSchema } from '../unit-file';

export { refrigerantRecordSchema, unitFileSchema };
export { unitSearchResultSchema };
