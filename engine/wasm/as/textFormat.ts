// Entry point of the 17-significant-digit number formatter (see engine/formats/csvWrite.ts).
export function textFormatVersion(): i32 {
  return 1;
}
