// Entry point of the delimited-text number parser (see engine/formats/textRows.ts).
export function textParseVersion(): i32 {
  return 1;
}
