package gdsii

import (
	"errors"
	"fmt"
	"math"
)

// Record types of the stream format (Calma manual, release 6.0).
const (
	recHeader       = 0x00
	recBgnLib       = 0x01
	recLibName      = 0x02
	recUnits        = 0x03
	recEndLib       = 0x04
	recBgnStr       = 0x05
	recStrName      = 0x06
	recEndStr       = 0x07
	recBoundary     = 0x08
	recPath         = 0x09
	recSRef         = 0x0A
	recARef         = 0x0B
	recText         = 0x0C
	recLayer        = 0x0D
	recDatatype     = 0x0E
	recWidth        = 0x0F
	recXY           = 0x10
	recEndEl        = 0x11
	recSName        = 0x12
	recColRow       = 0x13
	recNode         = 0x15
	recTextType     = 0x16
	recPresentation = 0x17
	recString       = 0x19
	recSTrans       = 0x1A
	recMag          = 0x1B
	recAngle        = 0x1C
	recRefLibs      = 0x1F
	recFonts        = 0x20
	recPathType     = 0x21
	recGenerations  = 0x22
	recAttrTable    = 0x23
	recElFlags      = 0x26
	recNodeType     = 0x2A
	recPropAttr     = 0x2B
	recPropValue    = 0x2C
	recBox          = 0x2D
	recBoxType      = 0x2E
	recPlex         = 0x2F
	recBgnExtn      = 0x30
	recEndExtn      = 0x31
	recFormat       = 0x36
	recMask         = 0x37
	recEndMasks     = 0x38
	recLibDirSize   = 0x39
	recSrfName      = 0x3A
	recLibSecur     = 0x3B
)

// Data types of a record's payload.
const (
	dtNone   = 0
	dtBits   = 1
	dtInt16  = 2
	dtInt32  = 3
	dtReal4  = 4
	dtReal8  = 5
	dtString = 6
)

var recordNames = map[byte]string{
	recHeader: "HEADER", recBgnLib: "BGNLIB", recLibName: "LIBNAME", recUnits: "UNITS",
	recEndLib: "ENDLIB", recBgnStr: "BGNSTR", recStrName: "STRNAME", recEndStr: "ENDSTR",
	recBoundary: "BOUNDARY", recPath: "PATH", recSRef: "SREF", recARef: "AREF", recText: "TEXT",
	recLayer: "LAYER", recDatatype: "DATATYPE", recWidth: "WIDTH", recXY: "XY", recEndEl: "ENDEL",
	recSName: "SNAME", recColRow: "COLROW", 0x14: "TEXTNODE", recNode: "NODE", recTextType: "TEXTTYPE",
	recPresentation: "PRESENTATION", 0x18: "SPACING", recString: "STRING", recSTrans: "STRANS",
	recMag: "MAG", recAngle: "ANGLE", 0x1D: "UINTEGER", 0x1E: "USTRING", recRefLibs: "REFLIBS",
	recFonts: "FONTS", recPathType: "PATHTYPE", recGenerations: "GENERATIONS",
	recAttrTable: "ATTRTABLE", 0x24: "STYPTABLE", 0x25: "STRTYPE", recElFlags: "ELFLAGS",
	0x27: "ELKEY", 0x28: "LINKTYPE", 0x29: "LINKKEYS", recNodeType: "NODETYPE",
	recPropAttr: "PROPATTR", recPropValue: "PROPVALUE", recBox: "BOX", recBoxType: "BOXTYPE",
	recPlex: "PLEX", recBgnExtn: "BGNEXTN", recEndExtn: "ENDEXTN", 0x32: "TAPENUM",
	0x33: "TAPECODE", 0x34: "STRCLASS", 0x35: "RESERVED", recFormat: "FORMAT", recMask: "MASK",
	recEndMasks: "ENDMASKS", recLibDirSize: "LIBDIRSIZE", recSrfName: "SRFNAME", recLibSecur: "LIBSECUR",
}

// recordName returns the manual's name of a record type, or its number.
func recordName(t byte) string {
	if n, ok := recordNames[t]; ok {
		return n
	}
	return fmt.Sprintf("record type 0x%02X", t)
}

// MaxRecordLen is the longest record the 2-byte length allows, in bytes.
const MaxRecordLen = 0xFFFF &^ 1

// MaxXY is the most points one XY record holds: (MaxRecordLen-4)/8.
const MaxXY = (MaxRecordLen - 4) / 8

// ErrReal is wrapped by every error about a value that has no 8-byte
// real form (NaN, infinite, or beyond 16^63 in magnitude).
var ErrReal = errors.New("no 8-byte real form")

// Real8 decodes an 8-byte excess-64 real: bit 63 the sign, bits 56–62
// the exponent E, bits 0–55 the mantissa M, value ±M·2⁻⁵⁶·16^(E−64).
// Every bit pattern is a finite number (there is no NaN or infinity);
// mantissas of more than 53 bits are rounded.
func Real8(b [8]byte) float64 {
	var m uint64
	for _, x := range b[1:] {
		m = m<<8 | uint64(x)
	}
	e := int(b[0] & 0x7F)
	v := math.Ldexp(float64(m), 4*(e-64)-56)
	if b[0]&0x80 != 0 {
		v = -v
	}
	return v
}

// PutReal8 encodes v as an 8-byte excess-64 real. Every float64 in range
// is encoded exactly: its 53-bit mantissa fits the 56 bits after a shift
// of at most 3. It returns an error wrapping ErrReal for NaN, infinities
// and magnitudes of 16^63 or more, and for nonzero magnitudes below
// 16^-65, which would lose every digit.
func PutReal8(v float64) ([8]byte, error) {
	var b [8]byte
	if v == 0 {
		return b, nil
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return b, fmt.Errorf("%g: %w", v, ErrReal)
	}
	sign := byte(0)
	if v < 0 {
		sign, v = 0x80, -v
	}
	frac, exp := math.Frexp(v) // v = frac·2^exp, frac in [0.5, 1)
	k := exp / 4               // v = m·16^k with m in [1/16, 1)
	if exp > 0 && exp%4 != 0 {
		k++
	}
	if exp <= 0 {
		k = -((-exp) / 4)
	}
	if k+64 > 127 {
		return b, fmt.Errorf("%g is 16^63 or more: %w", v, ErrReal)
	}
	if k+64 < 0 {
		return b, fmt.Errorf("%g is below 16^-65: %w", v, ErrReal)
	}
	// m·2^56 = frac·2^(56+exp-4k), an integer since 56+exp-4k >= 53.
	m := uint64(math.Ldexp(frac, 56+exp-4*k))
	b[0] = sign | byte(k+64)
	for i := 7; i >= 1; i-- {
		b[i] = byte(m)
		m >>= 8
	}
	return b, nil
}
