// The record splitter's scan (plainSWAR in records.go) in WebAssembly written by hand: eight
// bytes at a time, as plainSWAR, but in plain wasm loops rather than through the dispatch Go's
// wasm code sends every loop turn through (records_wasm.go). It answers with the scan states of
// records.go (complete 0, needMore 1, hasQuote 2) or tooMany (3), makes no calls, has no frame,
// and writes only into hdrs, which holds no pointers as far as the collector knows.

#include "textflag.h"

// Registers of splitLine: R0 data, R1 len(data), R2 the separator, R3 hdrs, R4 len(hdrs),
// R5 i, R6 the fields so far, R7 a byte, R8 the field's start, R9 its end, R10 the word's
// matches, R11 to R13 the separator, line end and quote in every byte of a word, R14 the byte's
// index, R15 scratch.

// FIELD stores the field [R8, R9) as a slice header (address, length, capacity = length) and
// counts it, or returns tooMany when hdrs is full. An empty field gets the address of data, so
// that no header points past the end of the buffer.
#define FIELD \
	Get R6; I64Const $1; I64Add; I64Const $3; I64Mul; Get R4; I64GtU; \
	If; Get SP; I64Const $3; I64Store st+72(FP); RET; End; \
	Get R3; Get R6; I64Const $24; I64Mul; I64Add; Set R15; \
	Get R15; I32WrapI64; Get R0; Get R8; I64Add; Get R0; Get R9; Get R8; I64GtU; Select; I64Store $0; \
	Get R15; I32WrapI64; Get R9; Get R8; I64Sub; I64Store $8; \
	Get R15; I32WrapI64; Get R9; Get R8; I64Sub; I64Store $16; \
	Get R6; I64Const $1; I64Add; Set R6

// TRIMCR drops a CR that ends the field [R8, R9).
#define TRIMCR \
	Get R9; Get R8; I64GtU; \
	If; Get R0; Get R9; I64Add; I64Const $1; I64Sub; I32WrapI64; I64Load8U $0; I64Const $13; I64Eq; \
	If; Get R9; I64Const $1; I64Sub; Set R9; End; End

// LAST ends the record with the field [R8, R9), R14 the bytes it takes.
#define LAST \
	TRIMCR; FIELD; \
	Get SP; Get R14; I64Store n+56(FP); \
	Get SP; Get R6; I64Store nf+64(FP); \
	Get SP; I64Const $0; I64Store st+72(FP); RET

// QUOTE hands the record to the quoted path.
#define QUOTE \
	Get SP; I64Const $2; I64Store st+72(FP); RET

// ENDORQUOTE handles the byte in R7, at index i: a line end ends the record, a quote hands it
// to the quoted path; anything else falls through.
#define ENDORQUOTE(i) \
	Get R7; I64Const $10; I64Eq; \
	If; Get i; Set R9; Get i; I64Const $1; I64Add; Set R14; LAST; End; \
	Get R7; I64Const $34; I64Eq; \
	If; QUOTE; End

// ZEROS leaves on the stack v with the high bit set in each byte that is zero and no other bit
// (zeroBytes in records.go).
#define ZEROS(v) \
	Get v; I64Const $0x7f7f7f7f7f7f7f7f; I64And; I64Const $0x7f7f7f7f7f7f7f7f; I64Add; \
	Get v; I64Or; I64Const $0x7f7f7f7f7f7f7f7f; I64Or; I64Const $-1; I64Xor

// func splitLine(data []byte, comma byte, eof bool, hdrs []uint64) (n, nf, st int)
TEXT ·splitLine(SB), NOSPLIT, $0-80
	I64Load data_base+0(FP)
	Set R0
	I64Load data_len+8(FP)
	Set R1
	I64Load8U comma+24(FP)
	Set R2
	I64Load hdrs_base+32(FP)
	Set R3
	I64Load hdrs_len+40(FP)
	Set R4
	I64Const $0
	Set R5
	I64Const $0
	Set R6
	I64Const $0
	Set R8
	Get R2
	I64Const $0x0101010101010101
	I64Mul
	Set R11
	I64Const $0x0a0a0a0a0a0a0a0a
	Set R12
	I64Const $0x2222222222222222
	Set R13

	// eight bytes at a time
	Block
	Loop
		Get R5
		I64Const $8
		I64Add
		Get R1
		I64GtU
		BrIf $1
		Get R0
		Get R5
		I64Add
		I32WrapI64
		I64Load $0
		Set R10
		Get R10
		Get R11
		I64Xor
		Set R15
		ZEROS(R15)
		Get R10
		Get R12
		I64Xor
		Set R15
		ZEROS(R15)
		I64Or
		Get R10
		Get R13
		I64Xor
		Set R15
		ZEROS(R15)
		I64Or
		Set R10 // the matches

		Block
		Loop
			Get R10
			I64Eqz
			BrIf $1
			Get R10
			I64Ctz
			I64Const $3
			I64ShrU
			Get R5
			I64Add
			Set R14
			Get R10
			Get R10
			I64Const $1
			I64Sub
			I64And
			Set R10
			Get R0
			Get R14
			I64Add
			I32WrapI64
			I64Load8U $0
			Set R7
			ENDORQUOTE(R14)
			// the separator
			Get R14
			Set R9
			FIELD
			Get R14
			I64Const $1
			I64Add
			Set R8
			Br $0
		End
		End

		Get R5
		I64Const $8
		I64Add
		Set R5
		Br $0
	End
	End

	// the last bytes, one at a time
	Block
	Loop
		Get R5
		Get R1
		I64GeU
		BrIf $1
		Get R0
		Get R5
		I64Add
		I32WrapI64
		I64Load8U $0
		Set R7
		ENDORQUOTE(R5)
		Get R7
		Get R2
		I64Eq
		If
			Get R5
			Set R9
			FIELD
			Get R5
			I64Const $1
			I64Add
			Set R8
		End
		Get R5
		I64Const $1
		I64Add
		Set R5
		Br $0
	End
	End

	I64Load8U eof+25(FP)
	I64Eqz
	If // more may follow
		Get SP
		I64Const $1
		I64Store st+72(FP)
		RET
	End
	// the input's end ends the last record
	Get R1
	Set R9
	Get R1
	Set R14
	LAST
