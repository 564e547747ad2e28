// The two passes of Dict.InternBatch in WebAssembly written by hand. Go's wasm code sends every
// jump back to the head of a loop through a dispatch at the head of its function (it sets a
// block number and branches to a br_table, as go build -gcflags=-S shows); these loops are plain
// wasm loops over wasm locals, which the browser compiles to tight machine loops. They compute
// exactly what hash and intern compute (dict_test.go and dict_wasm_test.go check it) and write
// no pointers, so they need no write barriers; they make no calls and never grow the stack
// (NOSPLIT, no frame). The caller has checked that hashes and out hold len(ends) entries.
//
// R0 to R15 are the function's 64-bit wasm locals; an address is a local wrapped to 32 bits.

#include "textflag.h"

// LOAD4TO7 leaves the n (4 to 7) bytes at p as a little-endian word, zero beyond them, on the
// stack: two 4-byte loads that overlap, as intern loads a short key.
#define LOAD4TO7(p, n) \
	Get p; I32WrapI64; I64Load32U $0; \
	Get p; Get n; I64Add; I64Const $4; I64Sub; I32WrapI64; I64Load32U $0; \
	Get n; I64Const $4; I64Sub; I64Const $3; I64Shl; I64Shl; I64Or

// LOAD1TO3 is LOAD4TO7 for 1 to 3 bytes: the first, the middle and the last.
#define LOAD1TO3(p, n) \
	Get p; I32WrapI64; I64Load8U $0; \
	Get p; Get n; I64Const $1; I64ShrU; I64Add; I32WrapI64; I64Load8U $0; \
	Get n; I64Const $1; I64ShrU; I64Const $3; I64Shl; I64Shl; I64Or; \
	Get p; Get n; I64Add; I64Const $1; I64Sub; I32WrapI64; I64Load8U $0; \
	Get n; I64Const $1; I64Sub; I64Const $3; I64Shl; I64Shl; I64Or

// LAST8 leaves the last eight of the n bytes at p (n >= 8) on the stack, as a little-endian word.
#define LAST8(p, n) \
	Get p; Get n; I64Add; I64Const $8; I64Sub; I32WrapI64; I64Load $0

// FOUND sets out[i] to the id in R14 (probeBatch).
#define FOUND \
	I64Load out_base+120(FP); Get R7; I64Const $2; I64Shl; I64Add; I32WrapI64; Get R14; I64Store32 $0

// FINALISE applies MurmurHash3's 64-bit finaliser to h, as hash does.
#define FINALISE(h) \
	Get h; Get h; I64Const $33; I64ShrU; I64Xor; I64Const $-49064778989728563; I64Mul; Set h; \
	Get h; Get h; I64Const $33; I64ShrU; I64Xor; I64Const $-4265267296055464877; I64Mul; Set h; \
	Get h; Get h; I64Const $33; I64ShrU; I64Xor; Set h

// func hashBatch(seed uint64, text []byte, ends []int, out []uint64) int
//
// R0 seed, R1 text, R2 &ends[i], R3 keys left, R4 the bytes left of the key, R5 their number,
// R6 the hash, R7 the last bytes, R8 &out[i], R9 the key's start, R10 its end, R11 len(text),
// R12 i.
TEXT ·hashBatch(SB), NOSPLIT, $0-88
	I64Load seed+0(FP)
	Set R0
	I64Load text_base+8(FP)
	Set R1
	I64Load text_len+16(FP)
	Set R11
	I64Load ends_base+32(FP)
	Set R2
	I64Load ends_len+40(FP)
	Set R3
	I64Load out_base+56(FP)
	Set R8
	I64Const $0
	Set R9
	I64Const $0
	Set R12

	Block
	Loop
		Get R3
		I64Eqz
		BrIf $1

		Get R2
		I32WrapI64
		I64Load $0
		Set R10
		// an end before the start or past the text: report the key
		Get R10
		Get R9
		I64LtS
		Get R10
		Get R11
		I64GtS
		I32Or
		If
			Get SP
			Get R12
			I64Store ret+80(FP)
			RET
		End
		Get R1
		Get R9
		I64Add
		Set R4 // p
		Get R10
		Get R9
		I64Sub
		Set R5 // n

		// h = seed ^ n*C0
		Get R0
		Get R5
		I64Const $-7046029254386353131
		I64Mul
		I64Xor
		Set R6

		Block
		Loop
			Get R5
			I64Const $8
			I64LtU
			BrIf $1
			Get R6
			Get R4
			I32WrapI64
			I64Load $0
			I64Xor
			I64Const $-4658895280553007687
			I64Mul
			I64Const $31
			I64Rotl
			Set R6
			Get R4
			I64Const $8
			I64Add
			Set R4
			Get R5
			I64Const $8
			I64Sub
			Set R5
			Br $0
		End
		End

		// the last 1 to 7 bytes, if any
		Get R5
		I64Eqz
		I32Eqz
		If
			Get R5
			I64Const $4
			I64GeU
			If
				LOAD4TO7(R4, R5)
				Set R7
			Else
				LOAD1TO3(R4, R5)
				Set R7
			End
			Get R6
			Get R7
			I64Xor
			I64Const $-7723592293110705685
			I64Mul
			Set R6
		End

		FINALISE(R6)

		Get R8
		I32WrapI64
		Get R6
		I64Store $0

		Get R10
		Set R9
		Get R2
		I64Const $8
		I64Add
		Set R2
		Get R8
		I64Const $8
		I64Add
		Set R8
		Get R12
		I64Const $1
		I64Add
		Set R12
		Get R3
		I64Const $1
		I64Sub
		Set R3
		Br $0
	End
	End
	Get SP
	I64Const $-1
	I64Store ret+80(FP)
	RET

// func probeBatch(slots []slot, text []byte, ends []int, hashes []uint64, names []string, out []int32, from int) int
//
// R0 the slots, R1 the mask, R2 text, R3 len(ends), R7 i, R8 the key's bytes, R9 its length,
// R10 its hash, then its slot, R11 the meta it wants (without the id), R12 and R13 its first 16
// bytes, R14 a slot's meta, then its id, R15 and R4 the name and offset compared for a key longer
// than 16 bytes, R5 scratch. A slot is 24 bytes (meta, k0, k1); a string header 16. hashBatch
// has checked the ends.
TEXT ·probeBatch(SB), NOSPLIT, $0-160
	I64Load slots_base+0(FP)
	Set R0
	I64Load slots_len+8(FP)
	I64Const $1
	I64Sub
	Set R1 // mask
	I64Load text_base+24(FP)
	Set R2
	I64Load ends_len+56(FP)
	Set R3
	I64Load from+144(FP)
	Set R7 // i

	Block // A: all keys found
	Loop // B: one key
		Get R7
		Get R3
		I64GeU
		BrIf $1

		// the key is text[ends[i-1]:ends[i]], from 0 for the first
		I64Load ends_base+48(FP)
		Get R7
		I64Const $3
		I64Shl
		I64Add
		Set R5 // &ends[i]
		I64Const $0
		Set R8
		Get R7
		I64Eqz
		I32Eqz
		If
			Get R5
			I64Const $8
			I64Sub
			I32WrapI64
			I64Load $0
			Set R8
		End
		Get R5
		I32WrapI64
		I64Load $0
		Get R8
		I64Sub
		Set R9 // n
		Get R2
		Get R8
		I64Add
		Set R8 // p
		I64Load hashes_base+72(FP)
		Get R7
		I64Const $3
		I64Shl
		I64Add
		I32WrapI64
		I64Load $0
		Set R10 // h

		// want = h>>40<<40 | min(n, 255)<<32
		Get R10
		I64Const $40
		I64ShrU
		I64Const $40
		I64Shl
		Get R9
		I64Const $255
		Get R9
		I64Const $255
		I64LtU
		Select
		I64Const $32
		I64Shl
		I64Or
		Set R11

		// k0, k1: the first 16 bytes, zero beyond n
		I64Const $0
		Set R12
		I64Const $0
		Set R13
		Get R9
		I64Const $8
		I64GeU
		If
			Get R8
			I32WrapI64
			I64Load $0
			Set R12
			Get R9
			I64Const $16
			I64GeU
			If
				Get R8
				I32WrapI64
				I64Load $8
				Set R13
			Else
				Get R9
				I64Const $8
				I64GtU
				If
					LAST8(R8, R9)
					I64Const $16
					Get R9
					I64Sub
					I64Const $3
					I64Shl
					I64ShrU
					Set R13
				End
			End
		Else
			Get R9
			I64Const $4
			I64GeU
			If
				LOAD4TO7(R8, R9)
				Set R12
			Else
				Get R9
				I64Eqz
				I32Eqz
				If
					LOAD1TO3(R8, R9)
					Set R12
				End
			End
		End

		Get R10
		Get R1
		I64And
		Set R10 // slot index

		Block // C: key found
		Loop // D: one slot
			Get R0
			Get R10
			I64Const $24
			I64Mul
			I64Add
			Set R5
			Get R5
			I32WrapI64
			I64Load $0
			Set R14 // meta
			Get R14
			I64Eqz
			If // an empty slot: the key is new; the caller adds it
				Get SP
				Get R7
				I64Store ret+152(FP)
				RET
			End

			Get R14
			I64Const $-4294967296
			I64And
			Get R11
			I64Eq
			Get R5
			I32WrapI64
			I64Load $8
			Get R12
			I64Eq
			I32And
			Get R5
			I32WrapI64
			I64Load $16
			Get R13
			I64Eq
			I32And
			If // F
				Get R14
				I64Const $4294967295
				I64And
				I64Const $1
				I64Sub
				Set R14 // id
				Get R9
				I64Const $16
				I64LeU
				If // G: the prefix is the key
					FOUND
					Br $3 // to the end of C
				End
				// a longer key: compare the rest with names[id]
				I64Load names_base+96(FP)
				Get R14
				I64Const $4
				I64Shl
				I64Add
				Set R5
				Get R5
				I32WrapI64
				I64Load $8
				Get R9
				I64Eq
				If // G'
					Get R5
					I32WrapI64
					I64Load $0
					Set R15 // q
					I64Const $16
					Set R4 // j
					Block // H: differs
					Block // I: words compared
					Loop // J
						Get R4
						I64Const $8
						I64Add
						Get R9
						I64GtU
						BrIf $1
						Get R15
						Get R4
						I64Add
						I32WrapI64
						I64Load $0
						Get R8
						Get R4
						I64Add
						I32WrapI64
						I64Load $0
						I64Ne
						BrIf $2
						Get R4
						I64Const $8
						I64Add
						Set R4
						Br $0
					End // J
					End // I
					// the last eight bytes (n > 16, so they are inside both)
					LAST8(R15, R9)
					LAST8(R8, R9)
					I64Eq
					If // K
						FOUND
						Br $5 // to the end of C
					End // K
					End // H
				End // G'
			End // F

			Get R10
			I64Const $1
			I64Add
			Get R1
			I64And
			Set R10
			Br $0
		End // D
		End // C

		Get R7
		I64Const $1
		I64Add
		Set R7
		Br $0
	End // B
	End // A

	Get SP
	Get R3
	I64Store ret+152(FP)
	RET
