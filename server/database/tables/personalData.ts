/** Tables of this area of work (none yet); each becomes a property of this interface. */
// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface PersonalDataTables {}
