// C++ twin of lib/inspection/parser.ts: GcodeParser, featureFromLabel, featureFromVerboseComment,
// the number scanner, arcs, text commands (Klipper SET_VELOCITY_LIMIT …), checksums, warnings and
// stats, operation for operation (same names, same order of arithmetic, same messages). See
// parser.h for the calling contract and for what the JavaScript side does with comment bytes.
//
// Semantics follow the NIST RS274NGC interpreter report (NISTIR 6556) for arcs, units, distance
// modes and modal motion, and the RepRap / Marlin G-code references for the printer dialect, as
// the TypeScript comments say beside each rule.
//
// Floating point: plain + − × ÷ and sqrt as in JavaScript, so results are bit-identical, except in
// arc(): Math.atan2 / Math.acos / Math.cos / Math.sin become std::atan2 / acos / cos / sin, which
// may differ from V8's by one ulp (chord points of G2/G3 only; the arc's end point is exact).
// Math.hypot is V8's own algorithm (jsHypot in common.h, bit-identical), Math.pow(10, n) a table of
// V8's values (jsPow10), because glibc's pow differs from V8's for some n.
#include "parser.h"

#include <cmath>
#include <cstring>

namespace hotlap {

namespace {

// Byte constants.
constexpr uint8_t SPACE = 32;
constexpr uint8_t TAB = 9;
constexpr uint8_t CR = 13;
constexpr uint8_t LF = 10;
constexpr uint8_t SEMI = 59;
constexpr uint8_t LPAREN = 40;
constexpr uint8_t RPAREN = 41;
constexpr uint8_t STAR = 42;
constexpr uint8_t PLUS = 43;
constexpr uint8_t MINUS = 45;
constexpr uint8_t DOT = 46;
constexpr uint8_t D0 = 48;
constexpr uint8_t D9 = 57;
constexpr uint8_t UNDERSCORE = 95;
// reader.ts MAX_LINE_BYTES: longest line kept.
constexpr size_t MAX_LINE = engine::MAX_LINE_BYTES;

constexpr int L_B = 1;
constexpr int L_E = 4;
constexpr int L_F = 5;
constexpr int L_G = 6;
constexpr int L_I = 8;
constexpr int L_J = 9;
constexpr int L_L = 11;
constexpr int L_M = 12;
constexpr int L_N = 13;
constexpr int L_P = 15;
constexpr int L_R = 17;
constexpr int L_S = 18;
constexpr int L_T = 19;
constexpr int L_X = 23;
constexpr int L_Y = 24;
constexpr int L_Z = 25;
constexpr uint32_t BIT(int l) { return 1u << l; }
constexpr uint32_t AXES_MASK = BIT(L_X) | BIT(L_Y) | BIT(L_Z) | BIT(L_E);

// Sanity caps (engineConstants.ts).
constexpr double MAX_COORD_MM = engine::PARSER_MAX_COORD_MM;
using engine::MAX_ARC_CHORDS;
using engine::MAX_E_MM;
using engine::MAX_FEED_MM_MIN;
using engine::MAX_LIMIT;
using engine::MIN_ACCEL;
using engine::MIN_FEED_LIMIT_MMS;
using engine::MIN_FEED_MM_MIN;

constexpr size_t kNone = static_cast<size_t>(-1);

// POW10[0..9]: powers of ten that are exact doubles (Math.pow gives these exactly too).
constexpr double kPow10Small[10] = {1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9};

// MachineState::mark() takes a std::string: built once, not per command.
const std::string kMarkM201 = "M201", kMarkM203 = "M203", kMarkM204 = "M204", kMarkM205 = "M205",
                  kMarkSetVelocityLimit = "SET_VELOCITY_LIMIT";

// Math.pow(10, n) in V8 for n = −323 … 308 (bit patterns); 10^n is 0 below and Infinity above.
const uint64_t kPow10Bits[] = {
    0x0000000000000002ull, 0x0000000000000014ull, 0x00000000000000caull, 0x00000000000007e8ull,
    0x0000000000004f10ull, 0x00000000000316a2ull, 0x00000000001ee257ull, 0x000000000134d761ull,
    0x000000000c1069cdull, 0x0000000078a42205ull, 0x00000004b6695433ull, 0x0000002f201d49fbull,
    0x000001d74124e3d1ull, 0x000012688b70e62bull, 0x0000b8157268fdafull, 0x000730d67819e8d2ull,
    0x0031fa182c40c60eull, 0x0066789e3750f790ull, 0x009c16c5c5253575ull, 0x00d18e3b9b374169ull,
    0x0105f1ca820511c4ull, 0x013b6e3d22865634ull, 0x017124e63593f5e1ull, 0x01a56e1fc2f8f359ull,
    0x01dac9a7b3b7302full, 0x0210be08d0527e1dull, 0x0244ed8b04671da5ull, 0x027a28edc580e50eull,
    0x02b059949b708f29ull, 0x02e46ff9c24cb2f3ull, 0x03198bf832dfdfb0ull, 0x034feef63f97d79cull,
    0x0383f559e7bee6c1ull, 0x03b8f2b061aea072ull, 0x03ef2f5c7a1a488eull, 0x04237d99cc506d59ull,
    0x04585d003f6488afull, 0x048e74404f3daadbull, 0x04c308a831868ac9ull, 0x04f7cad23de82d7bull,
    0x052dbd86cd6238d9ull, 0x05629674405d6388ull, 0x05973c115074bc6aull, 0x05cd0b15a491eb84ull,
    0x060226ed86db3333ull, 0x0636b0a8e8920000ull, 0x066c5cd322b67fffull, 0x06a1ba03f5b21000ull,
    0x06d62884f31e93ffull, 0x070bb2a62fe638ffull, 0x07414fa7ddefe3a0ull, 0x0775a391d56bdc87ull,
    0x07ab0c764ac6d3a9ull, 0x07e0e7c9eebc444aull, 0x081521bc6a6b555cull, 0x084a6a2b85062ab4ull,
    0x0880825b3323dab0ull, 0x08b4a2f1ffecd15cull, 0x08e9cbae7fe805b3ull, 0x09201f4d0ff10390ull,
    0x0954272053ed4474ull, 0x098930e868e89591ull, 0x09bf7d228322baf5ull, 0x09f3ae3591f5b4d9ull,
    0x0a2899c2f6732210ull, 0x0a5ec033b40fea93ull, 0x0a9338205089f29cull, 0x0ac8062864ac6f43ull,
    0x0afe07b27dd78b14ull, 0x0b32c4cf8ea6b6ecull, 0x0b677603725064a8ull, 0x0b9d53844ee47dd1ull,
    0x0bd25432b14ecea3ull, 0x0c06e93f5da2824cull, 0x0c3ca38f350b22dfull, 0x0c71e6398126f5cbull,
    0x0ca65fc7e170b33eull, 0x0cdbf7b9d9cce00eull, 0x0d117ad428200c08ull, 0x0d45d98932280f0aull,
    0x0d7b4feb7eb212cdull, 0x0db111f32f2f4bc0ull, 0x0de5566ffafb1eb0ull, 0x0e1aac0bf9b9e65cull,
    0x0e50ab877c142ffaull, 0x0e84d6695b193bf8ull, 0x0eba0c03b1df8af6ull, 0x0ef047824f2bb6daull,
    0x0f245962e2f6a490ull, 0x0f596fbb9bb44db4ull, 0x0f8fcbaa82a16121ull, 0x0fc3df4a91a4dcb5ull,
    0x0ff8d71d360e13e2ull, 0x102f0ce4839198dbull, 0x1063680ed23aff89ull, 0x1098421286c9bf6bull,
    0x10ce5297287c2f45ull, 0x1102f39e794d9d8bull, 0x1137b08617a104eeull, 0x116d9ca79d89462aull,
    0x11a281e8c275cbdaull, 0x11d72262f3133ed0ull, 0x120ceafbafd80e85ull, 0x124212dd4de70913ull,
    0x12769794a160cb58ull, 0x12ac3d79c9b8fe2eull, 0x12e1a66c1e139eddull, 0x1316100725988694ull,
    0x134b9408eefea839ull, 0x13813c85955f2923ull, 0x13b58ba6fab6f36cull, 0x13eaee90b964b047ull,
    0x1420d51a73deee2dull, 0x14550a6110d6a9b8ull, 0x148a4cf9550c5426ull, 0x14c0701bd527b498ull,
    0x14f48c22ca71a1beull, 0x1529af2b7d0e0a2dull, 0x15600d7b2e28c65cull, 0x159410d9f9b2f7f3ull,
    0x15c91510781fb5f0ull, 0x15ff5a549627a36cull, 0x16339874ddd8c623ull, 0x16687e92154ef7acull,
    0x169e9e369aa2b597ull, 0x16d322e220a5b17eull, 0x1707eb9aa8cf1ddeull, 0x173de6815302e556ull,
    0x1772b010d3e1cf56ull, 0x17a75c1508da432bull, 0x17dd331a4b10d3f6ull, 0x18123ff06eea847aull,
    0x1846cfec8aa52598ull, 0x187c83e7ad4e6efeull, 0x18b1d270cc51055full, 0x18e6470cff6546b6ull,
    0x191bd8d03f3e9864ull, 0x1951678227871f3eull, 0x1985c162b168e70eull, 0x19bb31bb5dc320d2ull,
    0x19f0ff151a99f483ull, 0x1a253eda614071a4ull, 0x1a5a8e90f9908e0dull, 0x1a90991a9bfa58c8ull,
    0x1ac4bf6142f8eefaull, 0x1af9ef3993b72ab8ull, 0x1b303583fc527ab3ull, 0x1b6442e4fb671960ull,
    0x1b99539e3a40dfb8ull, 0x1bcfa885c8d117a6ull, 0x1c03c9539d82aec8ull, 0x1c38bba884e35a7aull,
    0x1c6eea92a61c3118ull, 0x1ca3529ba7d19eafull, 0x1cd8274291c6065bull, 0x1d0e3113363787f2ull,
    0x1d42deac01e2b4f7ull, 0x1d779657025b6234ull, 0x1dad7becc2f23ac2ull, 0x1de26d73f9d764b9ull,
    0x1e1708d0f84d3de8ull, 0x1e4ccb0536608d61ull, 0x1e81fee341fc585dull, 0x1eb67e9c127b6e74ull,
    0x1eec1e43171a4a11ull, 0x1f2192e9ee706e4bull, 0x1f55f7a46a0c89ddull, 0x1f8b758d848fac55ull,
    0x1fc1297872d9cbb5ull, 0x1ff573d68f903ea2ull, 0x202ad0cc33744e4bull, 0x2060c27fa028b0efull,
    0x2094f31f8832dd2aull, 0x20ca2fe76a3f9475ull, 0x21005df0a267bcc9ull, 0x2134756ccb01abfcull,
    0x216992c7fdc216faull, 0x219ff779fd329cb9ull, 0x21d3faac3e3fa1f4ull, 0x2208f9574dcf8a70ull,
    0x223f37ad21436d0cull, 0x227382cc34ca2428ull, 0x22a8637f41fcad32ull, 0x22de7c5f127bd87eull,
    0x23130dbb6b8d674full, 0x2347d12a4670c122ull, 0x237dc574d80cf16bull, 0x23b29b69070816e3ull,
    0x23e7424348ca1c9cull, 0x241d12d41afca3c3ull, 0x24522bc490dde65aull, 0x2486b6b5b5155ff0ull,
    0x24bc6463225ab7ecull, 0x24f1bebdf578b2f4ull, 0x25262e6d72d6dfb0ull, 0x255bba08cf8c979cull,
    0x2591544581b7dec2ull, 0x25c5a956e225d672ull, 0x25fb13ac9aaf4c0full, 0x2630ec4be0ad8f89ull,
    0x2665275ed8d8f36cull, 0x269a71368f0f3046ull, 0x26d086c219697e2cull, 0x2704a8729fc3ddb7ull,
    0x2739d28f47b4d525ull, 0x277023998cd10537ull, 0x27a42c7ff0054685ull, 0x27d9379fec069826ull,
    0x280f8587e7083e30ull, 0x2843b374f06526deull, 0x2878a0522c7e7095ull, 0x28aec866b79e0cbaull,
    0x28e33d4032c2c7f4ull, 0x29180c903f7379f2ull, 0x294e0fb44f50586eull, 0x2982c9d0b1923745ull,
    0x29b77c44ddf6c516ull, 0x29ed5b561574765cull, 0x2a225915cd68c9f9ull, 0x2a56ef5b40c2fc78ull,
    0x2a8cab3210f3bb95ull, 0x2ac1eaff4a98553dull, 0x2af665bf1d3e6a8cull, 0x2b2bff2ee48e0530ull,
    0x2b617f7d4ed8c33eull, 0x2b95df5ca28ef40dull, 0x2bcb5733cb32b111ull, 0x2c0116805effaeaaull,
    0x2c355c2076bf9a55ull, 0x2c6ab328946f80eaull, 0x2ca0aff95cc5b092ull, 0x2cd4dbf7b3f71cb7ull,
    0x2d0a12f5a0f4e3e5ull, 0x2d404bd984990e6full, 0x2d745ecfe5bf520bull, 0x2da97683df2f268eull,
    0x2ddfd424d6faf031ull, 0x2e13e497065cd61full, 0x2e48ddbcc7f40ba6ull, 0x2e7f152bf9f10e90ull,
    0x2eb36d3b7c36a91aull, 0x2ee8488a5b445360ull, 0x2f1e5aacf2156838ull, 0x2f52f8ac174d6123ull,
    0x2f87b6d71d20b96cull, 0x2fbda48ce468e7c7ull, 0x2ff286d80ec190dcull, 0x3027288e1271f514ull,
    0x305cf2b1970e7258ull, 0x309217aefe690777ull, 0x30c69d9abe034955ull, 0x30fc45016d841baaull,
    0x3131ab20e472914aull, 0x316615e91d8f359dull, 0x319b9b6364f30304ull, 0x31d1411e1f17e1e3ull,
    0x32059165a6ddda5bull, 0x323af5bf109550f2ull, 0x3270d9976a5d5297ull, 0x32a50ffd44f4a73dull,
    0x32da53fc9631d10cull, 0x3310747ddddf22a8ull, 0x3344919d5556eb52ull, 0x3379b604aaaca626ull,
    0x33b011c2eaabe7d8ull, 0x33e41633a556e1ceull, 0x34191bc08eac9a42ull, 0x344f62b0b257c0d2ull,
    0x34839dae6f76d883ull, 0x34b8851a0b548ea4ull, 0x34eea6608e29b24dull, 0x352327fc58da0f70ull,
    0x3557f1fb6f10934cull, 0x358dee7a4ad4b81full, 0x35c2b50c6ec4f313ull, 0x35f7624f8a762fd8ull,
    0x362d3ae36d13bbceull, 0x366244ce242c5561ull, 0x3696d601ad376ab9ull, 0x36cc8b8218854567ull,
    0x3701d7314f534b61ull, 0x37364cfda3281e39ull, 0x376be03d0bf225c7ull, 0x37a16c262777579cull,
    0x37d5c72fb1552d84ull, 0x380b38fb9daa78e4ull, 0x3841039d428a8b8full, 0x38754484932d2e72ull,
    0x38aa95a5b7f87a0full, 0x38e09d8792fb4c49ull, 0x3914c4e977ba1f5cull, 0x3949f623d5a8a732ull,
    0x398039d665896880ull, 0x39b4484bfeebc2a0ull, 0x39e95a5efea6b348ull, 0x3a1fb0f6be506019ull,
    0x3a53ce9a36f23c10ull, 0x3a88c240c4aecb14ull, 0x3abef2d0f5da7dd9ull, 0x3af357c299a88ea8ull,
    0x3b282db34012b252ull, 0x3b5e392010175ee6ull, 0x3b92e3b40a0e9b50ull, 0x3bc79ca10c924224ull,
    0x3bfd83c94fb6d2acull, 0x3c32725dd1d243acull, 0x3c670ef54646d496ull, 0x3c9cd2b297d889bcull,
    0x3cd203af9ee75616ull, 0x3d06849b86a12b9bull, 0x3d3c25c268497682ull, 0x3d719799812dea11ull,
    0x3da5fd7fe1796495ull, 0x3ddb7cdfd9d7bdbbull, 0x3e112e0be826d695ull, 0x3e45798ee2308c3aull,
    0x3e7ad7f29abcaf48ull, 0x3eb0c6f7a0b5ed8dull, 0x3ee4f8b588e368f0ull, 0x3f1a36e2eb1c432cull,
    0x3f50624dd2f1a9fcull, 0x3f847ae147ae147bull, 0x3fb999999999999aull, 0x3ff0000000000000ull,
    0x4024000000000000ull, 0x4059000000000000ull, 0x408f400000000000ull, 0x40c3880000000000ull,
    0x40f86a0000000000ull, 0x412e848000000000ull, 0x416312d000000000ull, 0x4197d78400000000ull,
    0x41cdcd6500000000ull, 0x4202a05f20000000ull, 0x42374876e8000000ull, 0x426d1a94a2000000ull,
    0x42a2309ce5400000ull, 0x42d6bcc41e900000ull, 0x430c6bf526340000ull, 0x4341c37937e08000ull,
    0x4376345785d8a000ull, 0x43abc16d674ec800ull, 0x43e158e460913d00ull, 0x4415af1d78b58c40ull,
    0x444b1ae4d6e2ef50ull, 0x4480f0cf064dd592ull, 0x44b52d02c7e14af6ull, 0x44ea784379d99db4ull,
    0x45208b2a2c280291ull, 0x4554adf4b7320334ull, 0x4589d971e4fe8402ull, 0x45c027e72f1f1281ull,
    0x45f431e0fae6d722ull, 0x46293e5939a08ceaull, 0x465f8def8808b024ull, 0x4693b8b5b5056e17ull,
    0x46c8a6e32246c99cull, 0x46fed09bead87c04ull, 0x4733426172c74d82ull, 0x476812f9cf7920e2ull,
    0x479e17b84357691bull, 0x47d2ced32a16a1b1ull, 0x48078287f49c4a1eull, 0x483d6329f1c35ca5ull,
    0x48725dfa371a19e7ull, 0x48a6f578c4e0a060ull, 0x48dcb2d6f618c879ull, 0x4911efc659cf7d4cull,
    0x49466bb7f0435c9eull, 0x497c06a5ec5433c6ull, 0x49b18427b3b4a05cull, 0x49e5e531a0a1c873ull,
    0x4a1b5e7e08ca3a90ull, 0x4a511b0ec57e649aull, 0x4a8561d276ddfdc0ull, 0x4ababa4714957d30ull,
    0x4af0b46c6cdd6e3eull, 0x4b24e1878814c9ceull, 0x4b5a19e96a19fc41ull, 0x4b905031e2503da9ull,
    0x4bc4643e5ae44d13ull, 0x4bf97d4df19d6058ull, 0x4c2fdca16e04b86dull, 0x4c63e9e4e4c2f344ull,
    0x4c98e45e1df3b016ull, 0x4ccf1d75a5709c1bull, 0x4d03726987666191ull, 0x4d384f03e93ff9f5ull,
    0x4d6e62c4e38ff872ull, 0x4da2fdbb0e39fb47ull, 0x4dd7bd29d1c87a19ull, 0x4e0dac74463a989full,
    0x4e428bc8abe49f64ull, 0x4e772ebad6ddc73cull, 0x4eacfa698c95390cull, 0x4ee21c81f7dd43a7ull,
    0x4f16a3a275d49491ull, 0x4f4c4c8b1349b9b5ull, 0x4f81afd6ec0e1411ull, 0x4fb61bcca7119916ull,
    0x4feba2bfd0d5ff5bull, 0x502145b7e285bf99ull, 0x50559725db272f7full, 0x508afcef51f0fb5full,
    0x50c0de1593369d1bull, 0x50f5159af8044462ull, 0x512a5b01b605557bull, 0x516078e111c3556dull,
    0x5194971956342ac8ull, 0x51c9bcdfabc1357aull, 0x5200160bcb58c16cull, 0x52341b8ebe2ef1c7ull,
    0x526922726dbaae39ull, 0x529f6b0f092959c7ull, 0x52d3a2e965b9d81dull, 0x53088ba3bf284e24ull,
    0x533eae8caef261adull, 0x53732d17ed577d0cull, 0x53a7f85de8ad5c4eull, 0x53ddf67562d8b362ull,
    0x5412ba095dc7701eull, 0x5447688bb5394c25ull, 0x547d42aea2879f2eull, 0x54b249ad2594c37dull,
    0x54e6dc186ef9f45cull, 0x551c931e8ab87173ull, 0x5551dbf316b346e8ull, 0x558652efdc6018a2ull,
    0x55bbe7abd3781ecaull, 0x55f170cb642b133full, 0x5625ccfe3d35d80eull, 0x565b403dcc834e12ull,
    0x569108269fd210cbull, 0x56c54a3047c694feull, 0x56fa9cbc59b83a3eull, 0x5730a1f5b8132466ull,
    0x5764ca732617ed80ull, 0x5799fd0fef9de8e0ull, 0x57d03e29f5c2b18cull, 0x58044db473335defull,
    0x583961219000356bull, 0x586fb969f40042c5ull, 0x58a3d3e2388029bbull, 0x58d8c8dac6a0342aull,
    0x590efb1178484135ull, 0x59435ceaeb2d28c1ull, 0x59783425a5f872f1ull, 0x59ae412f0f768fadull,
    0x59e2e8bd69aa19ccull, 0x5a17a2ecc414a040ull, 0x5a4d8ba7f519c84full, 0x5a827748f9301d32ull,
    0x5ab7151b377c247eull, 0x5aecda62055b2d9eull, 0x5b22087d4358fc82ull, 0x5b568a9c942f3ba3ull,
    0x5b8c2d43b93b0a8cull, 0x5bc19c4a53c4e697ull, 0x5bf6035ce8b6203dull, 0x5c2b843422e3a84cull,
    0x5c6132a095ce4930ull, 0x5c957f48bb41db7cull, 0x5ccadf1aea12525bull, 0x5d00cb70d24b7379ull,
    0x5d34fe4d06de5057ull, 0x5d6a3de04895e46cull, 0x5da066ac2d5daec4ull, 0x5dd4805738b51a75ull,
    0x5e09a06d06e26112ull, 0x5e400444244d7cabull, 0x5e7405552d60dbd6ull, 0x5ea906aa78b912ccull,
    0x5edf485516e7577full, 0x5f138d352e5096afull, 0x5f48708279e4bc5bull, 0x5f7e8ca3185deb72ull,
    0x5fb317e5ef3ab327ull, 0x5fe7dddf6b095ff1ull, 0x601dd55745cbb7edull, 0x6052a5568b9f52f4ull,
    0x60874eac2e8727b1ull, 0x60bd22573a28f19dull, 0x60f2357684599702ull, 0x6126c2d4256ffcc3ull,
    0x615c73892ecbfbf4ull, 0x6191c835bd3f7d78ull, 0x61c63a432c8f5cd6ull, 0x61fbc8d3f7b3340cull,
    0x62315d847ad00088ull, 0x6265b4e5998400aaull, 0x629b221effe500d4ull, 0x62d0f5535fef2084ull,
    0x630532a837eae8a6ull, 0x633a7f5245e5a2cfull, 0x63708f936baf85c1ull, 0x63a4b378469b6732ull,
    0x63d9e056584240feull, 0x64102c35f729689full, 0x6444374374f3c2c6ull, 0x647945145230b378ull,
    0x64af965966bce056ull, 0x64e3bdf7e0360c36ull, 0x6518ad75d8438f43ull, 0x654ed8d34e547314ull,
    0x6583478410f4c7ecull, 0x65b819651531f9e8ull, 0x65ee1fbe5a7e7861ull, 0x6622d3d6f88f0b3dull,
    0x665788ccb6b2ce0cull, 0x668d6affe45f818full, 0x66c262dfeebbb0faull, 0x66f6fb97ea6a9d38ull,
    0x672cba7de5054486ull, 0x6761f48eaf234ad4ull, 0x679671b25aec1d88ull, 0x67cc0e1ef1a724ebull,
    0x680188d357087713ull, 0x6835eb082cca94d7ull, 0x686b65ca37fd3a0dull, 0x68a11f9e62fe4448ull,
    0x68d56785fbbdd55aull, 0x690ac1677aad4ab1ull, 0x6940b8e0acac4eafull, 0x6974e718d7d7625aull,
    0x69aa20df0dcd3af1ull, 0x69e0548b68a044d6ull, 0x6a1469ae42c8560cull, 0x6a498419d37a6b8full,
    0x6a7fe52048590673ull, 0x6ab3ef342d37a408ull, 0x6ae8eb0138858d0aull, 0x6b1f25c186a6f04cull,
    0x6b537798f4285630ull, 0x6b88557f31326bbcull, 0x6bbe6adefd7f06aaull, 0x6bf302cb5e6f642aull,
    0x6c27c37e360b3d35ull, 0x6c5db45dc38e0c82ull, 0x6c9290ba9a38c7d2ull, 0x6cc734e940c6f9c6ull,
    0x6cfd022390f8b837ull, 0x6d3221563a9b7322ull, 0x6d66a9abc9424febull, 0x6d9c5416bb92e3e6ull,
    0x6dd1b48e353bce70ull, 0x6e0621b1c28ac20cull, 0x6e3baa1e332d728full, 0x6e714a52dffc6799ull,
    0x6ea59ce797fb8180ull, 0x6edb04217dfa61dfull, 0x6f10e294eebc7d2cull, 0x6f451b3a2a6b9c76ull,
    0x6f7a6208b5068394ull, 0x6fb07d457124123dull, 0x6fe49c96cd6d16ccull, 0x7019c3bc80c85c7eull,
    0x70501a55d07d39cfull, 0x708420eb449c8843ull, 0x70b9292615c3aa54ull, 0x70ef736f9b3494e9ull,
    0x7123a825c100dd11ull, 0x7158922f31411456ull, 0x718eb6bafd91596bull, 0x71c33234de7ad7e3ull,
    0x71f7fec216198ddcull, 0x722dfe729b9ff152ull, 0x7262bf07a143f6d4ull, 0x72976ec98994f488ull,
    0x72cd4a7bebfa31abull, 0x73024e8d737c5f0bull, 0x7336e230d05b76cdull, 0x736c9abd04725481ull,
    0x73a1e0b622c774d0ull, 0x73d658e3ab795204ull, 0x740bef1c9657a686ull, 0x74417571ddf6c814ull,
    0x7475d2ce55747a18ull, 0x74ab4781ead1989eull, 0x74e10cb132c2ff63ull, 0x75154fdd7f73bf3cull,
    0x754aa3d4df50af0bull, 0x7580a6650b926d67ull, 0x75b4cffe4e7708c0ull, 0x75ea03fde214caf0ull,
    0x7620427ead4cfed6ull, 0x7654531e58a03e8cull, 0x768967e5eec84e2full, 0x76bfc1df6a7a61bbull,
    0x76f3d92ba28c7d15ull, 0x7728cf768b2f9c5aull, 0x775f03542dfb8370ull, 0x779362149cbd3226ull,
    0x77c83a99c3ec7eb0ull, 0x77fe494034e79e5cull, 0x7832edc82110c2f9ull, 0x7867a93a2954f3b8ull,
    0x789d9388b3aa30a6ull, 0x78d27c35704a5e68ull, 0x79071b42cc5cf602ull, 0x793ce2137f743382ull,
    0x79720d4c2fa8a031ull, 0x79a6909f3b92c83dull, 0x79dc34c70a777a4cull, 0x7a11a0fc668aac70ull,
    0x7a46093b802d578cull, 0x7a7b8b8a6038ad6full, 0x7ab137367c236c65ull, 0x7ae585041b2c477eull,
    0x7b1ae64521f7595eull, 0x7b50cfeb353a97dbull, 0x7b8503e602893dd2ull, 0x7bba44df832b8d46ull,
    0x7bf06b0bb1fb384cull, 0x7c2485ce9e7a065eull, 0x7c59a742461887f6ull, 0x7c9008896bcf54faull,
    0x7cc40aabc6c32a38ull, 0x7cf90d56b873f4c6ull, 0x7d2f50ac6690f1f8ull, 0x7d63926bc01a973bull,
    0x7d987706b0213d0aull, 0x7dce94c85c298c4cull, 0x7e031cfd3999f7b0ull, 0x7e37e43c8800759cull,
    0x7e6ddd4baa009303ull, 0x7ea2aa4f4a405be2ull, 0x7ed754e31cd072daull, 0x7f0d2a1be4048f90ull,
    0x7f423a516e82d9baull, 0x7f76c8e5ca239029ull, 0x7fac7b1f3cac7433ull, 0x7fe1ccf385ebc8a0ull,
};

// Byte classes of the word loop in lineImpl() (C++ only, for speed: one table load replaces the
// TypeScript's chains of comparisons; each class is exactly one of its tests). A letter's class
// is its index 0..25, as (c | 0x20) − 97 gives it; isTerminator() is K_BLANK … K_STAR, so a byte
// that is neither a terminator nor a letter is K_OTHER.
constexpr uint8_t K_BLANK = 26;  // SPACE, TAB
constexpr uint8_t K_LF = 27;
constexpr uint8_t K_CR = 28;
constexpr uint8_t K_SEMI = 29;
constexpr uint8_t K_LPAREN = 30;
constexpr uint8_t K_STAR = 31;
constexpr uint8_t K_OTHER = 32;

struct ByteClasses {
  uint8_t k[256];
};

constexpr ByteClasses makeByteClasses() {
  ByteClasses t{};
  for (int c = 0; c < 256; c++) {
    const int l = (c | 0x20) - 97;
    t.k[c] = l >= 0 && l <= 25 ? static_cast<uint8_t>(l)
             : c == SPACE || c == TAB ? K_BLANK
             : c == LF               ? K_LF
             : c == CR               ? K_CR
             : c == SEMI             ? K_SEMI
             : c == LPAREN           ? K_LPAREN
             : c == STAR             ? K_STAR
                                     : K_OTHER;
  }
  return t;
}

constexpr ByteClasses kByteClass = makeByteClasses();

inline int byteClass(uint8_t c) { return kByteClass.k[c]; }

// SPACE, TAB, CR, LF, ';', '(' or '*'.
bool isTerminator(uint8_t c) {
  const int k = byteClass(c);
  return k >= K_BLANK && k <= K_STAR;
}

size_t skipWord(const uint8_t* buf, size_t i, size_t end) {
  while (i < end && !isTerminator(buf[i])) i++;
  return i;
}

// Number.isInteger.
bool isInteger(double v) { return std::isfinite(v) && std::floor(v) == v; }

// A double that is a whole number in [0, 100000) as an int, else −1 (for switches over G/M codes,
// which JavaScript compares with ===; −0 is 0).
// (C++: for v in [0, 100000) the int conversion is exact when v is whole, so comparing it back
// tests std::floor(v) == v without a call to floor.)
int codeInt(double v) {
  if (!(v >= 0 && v < 100000)) return -1;
  const int i = static_cast<int>(v);
  return static_cast<double>(i) == v ? i : -1;
}

// Appends latin1 text (each byte one character, Buffer#toString('latin1')) as UTF-8.
void appendLatin1(std::string& out, const uint8_t* p, size_t n) {
  for (size_t k = 0; k < n; k++) {
    uint8_t b = p[k];
    if (b < 0x80) {
      out += static_cast<char>(b);
    } else {
      out += static_cast<char>(0xC0 | (b >> 6));
      out += static_cast<char>(0x80 | (b & 0x3F));
    }
  }
}

// String#toUpperCase of latin1 text, as UTF-8 (the full case mapping of U+0000–U+00FF).
void appendLatin1Upper(std::string& out, const uint8_t* p, size_t n) {
  for (size_t k = 0; k < n; k++) {
    uint8_t b = p[k];
    if (b >= 'a' && b <= 'z') {
      out += static_cast<char>(b - 32);
    } else if (b < 0x80) {
      out += static_cast<char>(b);
    } else if (b == 0xB5) {
      out += "\xCE\x9C";  // µ → U+039C
    } else if (b == 0xDF) {
      out += "SS";  // ß
    } else if (b == 0xFF) {
      out += "\xC5\xB8";  // ÿ → U+0178
    } else {
      uint8_t u = b >= 0xE0 && b != 0xF7 ? static_cast<uint8_t>(b - 0x20) : b;
      appendLatin1(out, &u, 1);
    }
  }
}

// One character of UTF-8 at p[i] (i < n), decoded as Buffer#toString('utf8') decodes it (WHATWG:
// an invalid maximal subpart is one U+FFFD); advances i past it.
uint32_t decodeUtf8(const uint8_t* p, size_t n, size_t& i) {
  uint8_t b = p[i++];
  if (b < 0x80) return b;
  int need;
  uint32_t cp;
  uint8_t lo = 0x80, hi = 0xBF;
  if (b >= 0xC2 && b <= 0xDF) {
    need = 1;
    cp = b & 0x1F;
  } else if (b >= 0xE0 && b <= 0xEF) {
    need = 2;
    cp = b & 0x0F;
    if (b == 0xE0) lo = 0xA0;
    if (b == 0xED) hi = 0x9F;
  } else if (b >= 0xF0 && b <= 0xF4) {
    need = 3;
    cp = b & 0x07;
    if (b == 0xF0) lo = 0x90;
    if (b == 0xF4) hi = 0x8F;
  } else {
    return 0xFFFD;
  }
  while (need > 0) {
    if (i >= n) return 0xFFFD;
    uint8_t c = p[i];
    if (c < lo || c > hi) return 0xFFFD;  // this byte starts the next character
    lo = 0x80;
    hi = 0xBF;
    cp = (cp << 6) | (c & 0x3F);
    i++;
    need--;
  }
  return cp;
}

// Non-ASCII white space of String#trim and /\s/.
bool isJsSpaceNonAscii(uint32_t cp) {
  return cp == 0xA0 || cp == 0x1680 || (cp >= 0x2000 && cp <= 0x200A) || cp == 0x2028 || cp == 0x2029 || cp == 0x202F ||
         cp == 0x205F || cp == 0x3000 || cp == 0xFEFF;
}

// Marks in a matching key: characters no ASCII pattern can match.
constexpr char kOther = '\x80';
constexpr char kSpace = '\x81';  // non-ASCII white space (trimmed at the ends, else like kOther)

// Appends the UTF-8 text [i, n) lowered for matching against ASCII patterns: ASCII as
// String#toLowerCase gives it, U+212A → "k" and U+0130 → "i" + mark (what toLowerCase gives:
// "k", "i̇"), other white space kSpace, any other character kOther. Stops after `cap` bytes out.
void appendMatchKey(std::string& out, const uint8_t* p, size_t i, size_t n, size_t cap) {
  while (i < n && out.size() < cap) {
    uint8_t b = p[i];
    if (b < 0x80) {
      out += static_cast<char>(b >= 'A' && b <= 'Z' ? b + 32 : b);
      i++;
      continue;
    }
    uint32_t cp = decodeUtf8(p, n, i);
    if (cp == 0x212A) {
      out += 'k';
    } else if (cp == 0x130) {
      out += 'i';
      out += kOther;
    } else {
      out += isJsSpaceNonAscii(cp) ? kSpace : kOther;
    }
  }
}

bool isTrimmed(char c) { return c == ' ' || (c >= '\t' && c <= '\r') || c == kSpace; }

bool startsWith(std::string_view s, std::string_view p) { return s.substr(0, p.size()) == p; }

// featureFromLabel on a match key (already trimmed and lowered).
int featureFromKey(std::string_view l) {
  if (l == "custom") return kFeatureNone;
  // PrusaSlicer / Slic3r PE labels
  if (l == "external perimeter") return F_OUTER_WALL;
  if (l == "perimeter") return F_INNER_WALL;
  if (l == "overhang perimeter") return F_OVERHANG_WALL;
  if (l == "internal infill") return F_SPARSE_INFILL;
  if (l == "solid infill") return F_SOLID_INFILL;
  if (l == "top solid infill") return F_TOP_SOLID;
  if (l == "bottom solid infill") return F_BOTTOM_SOLID;
  if (l == "bridge infill" || l == "internal bridge infill") return F_BRIDGE;
  if (l == "skirt" || l == "skirt/brim" || l == "brim") return F_SKIRT;
  if (l == "support material" || l == "support material interface") return F_SUPPORT;
  if (l == "gap fill") return F_GAP_FILL;
  // CuraEngine labels
  if (l == "wall-outer") return F_OUTER_WALL;
  if (l == "wall-inner") return F_INNER_WALL;
  if (l == "fill") return F_SPARSE_INFILL;
  if (l == "skin") return F_SOLID_INFILL;
  if (l == "support" || l == "support-interface" || l == "support-infill") return F_SUPPORT;
  // Orca-style ";FEATURE:" spellings and anything else
  if (l == "outer wall") return F_OUTER_WALL;
  if (l == "inner wall") return F_INNER_WALL;
  if (l == "sparse infill") return F_SPARSE_INFILL;
  if (l == "internal solid infill") return F_SOLID_INFILL;
  if (l == "top surface") return F_TOP_SOLID;
  if (l == "bottom surface") return F_BOTTOM_SOLID;
  if (startsWith(l, "bridge")) return F_BRIDGE;
  if (l.find("skirt") != std::string_view::npos || l.find("brim") != std::string_view::npos) return F_SKIRT;
  if (startsWith(l, "support")) return F_SUPPORT;
  return F_OTHER;
}

// featureFromLabel(label) where label is the text of [i, n): label.trim().toLowerCase(), then the table.
int featureFromLabelAt(const uint8_t* p, size_t i, size_t n, std::string& key) {
  key.clear();
  appendMatchKey(key, p, i, n, static_cast<size_t>(-1));
  size_t a = 0, b = key.size();
  while (a < b && isTrimmed(key[a])) a++;
  while (b > a && isTrimmed(key[b - 1])) b--;
  return featureFromKey(std::string_view(key).substr(a, b - a));
}

// featureFromVerboseComment: Slic3r's verbose per-move comments (gcode_comments = 1) → feature, or
// null. Only the first 24 bytes of the key matter (the longest pattern has 18).
int featureFromVerboseComment(const uint8_t* p, size_t n, std::string& key) {
  key.clear();
  appendMatchKey(key, p, 0, n, 24);
  bool whole = key.size() < 24;  // else longer than every pattern compared whole
  std::string_view l(key);
  if (whole) {
    if (l == "perimeter") return F_INNER_WALL;
    if (l == "external perimeter") return F_OUTER_WALL;
    if (l == "infill" || l == "fill") return F_SPARSE_INFILL;
    if (l == "solid infill") return F_SOLID_INFILL;
    if (l == "top solid infill") return F_TOP_SOLID;
    if (l == "bridge infill" || l == "bridge" || l == "infill (bridge)") return F_BRIDGE;
    if (l == "skirt" || l == "brim") return F_SKIRT;
  }
  if (startsWith(l, "support material")) return F_SUPPORT;
  if (whole && l == "gap fill") return F_GAP_FILL;
  return kFeatureNone;
}

// M-codes whose argument is free text; the rest of the line is not parsed as words.
// (C++: a switch over codeInt(m), the same set: each code is a whole number, −0 is 0, NaN is −1.)
bool isTextArgMcode(double m) {
  switch (codeInt(m)) {
    case 117: case 118: case 23: case 28: case 29: case 30: case 32: case 928: case 33:
      return true;
    default:
      return false;
  }
}

// G/M codes understood as having no effect on measurements or time.
bool knownNoEffectG(int g) {
  switch (g) {
    case 17: case 29: case 30: case 31: case 32: case 34: case 53: case 54: case 55: case 56: case 57: case 58:
    case 59: case 60: case 61: case 64: case 80: case 94:
      return true;
    default:
      return false;
  }
}

bool knownNoEffectM(int m) {
  switch (m) {
    case 0: case 1: case 17: case 18: case 23: case 24: case 25: case 26: case 27: case 28: case 29: case 30:
    case 31: case 32: case 33: case 42: case 48: case 49: case 73: case 74: case 75: case 76: case 77: case 78:
    case 80: case 81: case 84: case 105: case 107: case 108: case 110: case 111: case 112: case 113: case 114:
    case 115: case 117: case 118: case 119: case 120: case 121: case 122: case 141: case 149: case 150: case 155:
    case 163: case 164: case 191: case 200: case 206: case 209: case 210: case 211: case 217: case 218: case 232:
    case 280: case 290: case 300: case 400: case 401: case 402: case 412: case 413: case 420: case 486: case 500:
    case 501: case 502: case 503: case 555: case 566: case 568: case 572: case 593: case 600: case 601: case 701:
    case 702: case 851: case 862: case 900: case 907: case 928: case 1001: case 1002:
      return true;
    default:
      return false;
  }
}

// Klipper extended commands that change neither geometry, filament nor the motion limits we model
// (Klipper G-code reference). User macros such as PRINT_START stay "unknown": they can do anything.
bool knownNoEffectText(const std::string& name) {
  static const char* const kNames[] = {
      "EXCLUDE_OBJECT_DEFINE", "EXCLUDE_OBJECT_START", "EXCLUDE_OBJECT_END", "SET_PRESSURE_ADVANCE",
      "SET_FAN_SPEED",         "SET_HEATER_TEMPERATURE", "TEMPERATURE_WAIT", "TURN_OFF_HEATERS",
      "SET_PRINT_STATS_INFO",  "SET_IDLE_TIMEOUT",     "BED_MESH_PROFILE",   "BED_MESH_CALIBRATE"};
  for (const char* n : kNames)
    if (name == n) return true;
  return false;
}

void recordOverride(OverrideStats& rec, double percent, double lineNo) {
  rec.count++;
  if (!rec.max || percent > rec.max->percent) rec.max = OverrideEvent{percent, lineNo};
  if (!rec.min || percent < rec.min->percent) rec.min = OverrideEvent{percent, lineNo};
}

// White space of /\s/ among latin1 characters.
bool isLatin1Space(uint8_t c) { return c == 9 || c == 10 || c == 11 || c == 12 || c == 13 || c == 32 || c == 0xA0; }

// Key of a KEY=VALUE part equal (after String#toUpperCase) to an ASCII name. Only 'ß' uppercases
// to ASCII ("SS") among non-ASCII latin1 characters, and no name here contains "SS", so a key with
// any non-ASCII byte matches none.
bool keyIs(const uint8_t* p, size_t n, const char* name) {
  size_t len = std::strlen(name);
  if (n != len) return false;
  for (size_t k = 0; k < n; k++) {
    uint8_t c = p[k];
    if (c >= 'a' && c <= 'z') c = static_cast<uint8_t>(c - 32);
    if (c != static_cast<uint8_t>(name[k])) return false;
  }
  return true;
}

// parseKeyValues("KEY=VALUE KEY=VALUE") (Klipper extended commands) for the keys asked for: out[k]
// gets the last finite value of key names[k] (a Map.set of a later part overwrites), else stays
// unset. Parts are split on /\s+/ after trim(); a part without '=' or starting with it is skipped.
template <size_t N>
void parseKeyValues(const uint8_t* buf, size_t s, size_t e, const char* const (&names)[N],
                    std::optional<double> (&out)[N]) {
  size_t i = s;
  while (i < e) {
    while (i < e && isLatin1Space(buf[i])) i++;
    size_t a = i;
    while (i < e && !isLatin1Space(buf[i])) i++;
    if (i == a) break;
    size_t eq = a;
    while (eq < i && buf[eq] != '=') eq++;
    if (eq == i || eq == a) continue;
    double v = jsStringToNumber(buf + eq + 1, i - eq - 1);
    if (!std::isfinite(v)) continue;
    for (size_t k = 0; k < N; k++)
      if (keyIs(buf + a, eq - a, names[k])) out[k] = v;
  }
}

std::string letterName(int letter) { return std::string(1, static_cast<char>(letter + 65)); }

// Parses digits of a power-of-two radix as V8 does for "0x…", "0o…", "0b…" (correctly rounded).
double radixToNumber(const uint8_t* p, size_t n, int log2) {
  const int radix = 1 << log2;
  auto digitOf = [radix](uint8_t c) -> int {
    int d;
    if (c >= '0' && c <= '9') d = c - '0';
    else if (c >= 'a' && c <= 'z') d = c - 'a' + 10;
    else if (c >= 'A' && c <= 'Z') d = c - 'A' + 10;
    else return -1;
    return d < radix ? d : -1;
  };
  if (n == 0) return NAN;
  for (size_t k = 0; k < n; k++)
    if (digitOf(p[k]) < 0) return NAN;
  size_t k = 0;
  while (k < n && p[k] == '0') k++;
  if (k == n) return 0;
  int64_t number = 0;
  int exponent = 0;
  for (; k < n; k++) {
    number = number * radix + digitOf(p[k]);
    int overflow = static_cast<int>(number >> 53);
    if (overflow != 0) {
      // Round the dropped bits to nearest, ties to even.
      int overflowBits = 1;
      while (overflow > 1) {
        overflowBits++;
        overflow >>= 1;
      }
      int droppedMask = (1 << overflowBits) - 1;
      int dropped = static_cast<int>(number) & droppedMask;
      number >>= overflowBits;
      exponent = overflowBits;
      bool zeroTail = true;
      for (k++; k < n; k++) {
        zeroTail = zeroTail && p[k] == '0';
        exponent += log2;
      }
      int middle = 1 << (overflowBits - 1);
      if (dropped > middle || (dropped == middle && ((number & 1) != 0 || !zeroTail))) number++;
      if ((number & (static_cast<int64_t>(1) << 53)) != 0) {
        exponent++;
        number >>= 1;
      }
      break;
    }
  }
  return std::ldexp(static_cast<double>(number), exponent);
}

}  // namespace

double jsPow10(double n) {
  if (n > 308) return INFINITY;
  if (n < -323) return 0;
  double v;
  uint64_t bits = kPow10Bits[static_cast<int>(n) + 323];
  std::memcpy(&v, &bits, sizeof v);
  return v;
}

double jsStringToNumber(const uint8_t* p, size_t n) {
  // StringToNumber: surrounding white space is ignored; "" is 0.
  while (n > 0 && isLatin1Space(p[0])) {
    p++;
    n--;
  }
  while (n > 0 && isLatin1Space(p[n - 1])) n--;
  if (n == 0) return 0;
  if (n >= 2 && p[0] == '0') {
    uint8_t x = p[1] | 0x20;
    if (x == 'x') return radixToNumber(p + 2, n - 2, 4);
    if (x == 'o') return radixToNumber(p + 2, n - 2, 3);
    if (x == 'b') return radixToNumber(p + 2, n - 2, 1);
  }
  bool neg = false;
  size_t i = 0;
  if (p[0] == '+' || p[0] == '-') {
    neg = p[0] == '-';
    i = 1;
  }
  static const char kInf[] = "Infinity";
  if (n - i == 8 && std::memcmp(p + i, kInf, 8) == 0) return neg ? -INFINITY : INFINITY;
  // StrUnsignedDecimalLiteral: digits [. digits] [e [+-] digits], at least one mantissa digit.
  size_t intA = i;
  while (i < n && p[i] >= '0' && p[i] <= '9') i++;
  size_t intB = i, fracA = i, fracB = i;
  if (i < n && p[i] == '.') {
    fracA = ++i;
    while (i < n && p[i] >= '0' && p[i] <= '9') i++;
    fracB = i;
  }
  if (intB == intA && fracB == fracA) return NAN;
  size_t expA = i;
  long long ex = 0;
  if (i < n && (p[i] | 0x20) == 'e') {
    i++;
    bool eneg = false;
    if (i < n && (p[i] == '+' || p[i] == '-')) {
      eneg = p[i] == '-';
      i++;
    }
    size_t da = i;
    while (i < n && p[i] >= '0' && p[i] <= '9') {
      if (ex < 100000000) ex = ex * 10 + (p[i] - '0');
      i++;
    }
    if (i == da) return NAN;
    if (eneg) ex = -ex;
  }
  if (i != n) return NAN;
  std::string text;
  text.reserve(n + 2);
  if (intB > intA) text.append(reinterpret_cast<const char*>(p + intA), intB - intA);
  else text += '0';
  if (fracB > fracA) {
    text += '.';
    text.append(reinterpret_cast<const char*>(p + fracA), fracB - fracA);
  }
  text.append(reinterpret_cast<const char*>(p + expA), n - expA);
  double v = 0;
  auto r = std::from_chars(text.data(), text.data() + text.size(), v, std::chars_format::general);
  if (r.ec == std::errc::result_out_of_range) {
    // Overflow (→ Infinity) or underflow (→ 0): decided by the magnitude of the first digit.
    long long mag = 0;
    bool found = false;
    for (size_t k = intA; k < intB && !found; k++)
      if (p[k] != '0') {
        mag = static_cast<long long>(intB - k) - 1;
        found = true;
      }
    for (size_t k = fracA; k < fracB && !found; k++)
      if (p[k] != '0') {
        mag = -static_cast<long long>(k - fracA) - 1;
        found = true;
      }
    v = found && mag + ex > 0 ? INFINITY : 0;
  } else if (r.ec != std::errc() || r.ptr != text.data() + text.size()) {
    return NAN;
  }
  return neg ? -v : v;
}

int featureFromLabel(const uint8_t* label, size_t len) {
  std::string key;
  return featureFromLabelAt(label, 0, len, key);
}

Parser::Parser(MotionSink& sink, const ParserOptions& options, MachineState& machine)
    : sink_(sink), machine_(machine) {
  wantsComments_ = options.wantsComments;
  verifyChecksums_ = options.verifyChecksums;
  arcTolMm_ = options.arcToleranceMm;
  maxWarnings_ = options.maxWarnings;
  // Default length for G10 when no M207 is present: Marlin's FWRETRACT RETRACT_LENGTH (3 mm, 45 mm/s).
  fwRetractMm_ = options.firmwareRetractMm;
  fwRetractFeedMms_ = options.firmwareRetractFeedMms;
  fwRecoverFeedMms_ = fwRetractFeedMms_;
  for (double& f : flowFactor_) f = 1;
  scratch_.reserve(256);
}

// warn(): counts the warning and says whether its message is stored (then call warn()).
bool Parser::warnSlot() {
  stats_.warningsTotal++;
  return static_cast<double>(warnings_.size()) < maxWarnings_;
}

void Parser::warn(const char* code, std::string message) {
  warnings_.push_back(ParserWarning{code, lineNo_, std::move(message)});
}

void Parser::longLine(double bytes) { noteLongLine(bytes, lineNo_ + 1, warnings_.size()); }

void Parser::end() { sink_.end(); }

void Parser::line(const uint8_t* buf, size_t start, size_t end) { lineImpl(buf, start, end); }

// Parses one line, [start, end) without its line break. Also the worker of lines(): the scan stops
// at an LF, whose index it returns (else end).
size_t Parser::lineImpl(const uint8_t* buf, size_t start, size_t end) {
  lineNo_++;
  stats_.lines++;
  beginStatement();
  size_t i = start;
  size_t stmtStart = start;
  while (i < end) {
    const uint8_t c = buf[i];
    // Letters first: they start most words, so the common case takes one test. (C++: the class
    // table gives (c | 0x20) − 97 for a letter, and the other tests below, in one load.)
    const int cls = byteClass(c);
    if (cls <= 25) {
      const int letter = cls;  // lower-case, 0..25 for a letter
      // A first word that is a name, not a letter + number, is a text command (Klipper style).
      if (firstWord_ && i + 1 < end) {
        const uint8_t n1 = buf[i + 1];
        if (n1 == UNDERSCORE || byteClass(n1) <= 25) {
          i = textCommand(buf, i, end);
          continue;
        }
      }
      const size_t wordAt = i;
      i++;
      size_t j = readNumber(buf, i, end);
      if (j == kNone) {
        // Letter without a number, e.g. "G28 X Y": present, no value. Bad text right after it is malformed.
        const uint8_t nc = i < end ? buf[i] : SPACE;
        if (byteClass(nc) == K_OTHER) {
          if (warnSlot())
            warn("malformed-number", "Line " + jsNumber(lineNo_) + ": '" + letterName(letter) +
                                         "' is not followed by a valid number; word ignored.");
          i = skipWord(buf, i, end);
          continue;
        }
        storeWord(letter, NAN);
        continue;
      }
      const uint8_t nc = j < end ? buf[j] : SPACE;
      const int ncls = byteClass(nc);
      if (ncls <= 25) {
        // readNumber()'s exponent test, `spaced && i + 1 < end && (buf[i] | 0x20) === 101`, made
        // here (C++ only: the word's `spaced` is worked out only when an 'e' follows the digits).
        // After an exponent the next byte is a terminator, else the 'e' starts the next word:
        // either way the word is well formed.
        if ((nc | 0x20) == 101 && j + 1 < end && (wordAt == start || buf[wordAt - 1] == SPACE || buf[wordAt - 1] == TAB))
          j = readExponent(buf, j, end);
      } else if (ncls == K_OTHER) {
        if (warnSlot()) {
          std::string m = "Line " + jsNumber(lineNo_) + ": malformed number '";
          size_t to = skipWord(buf, j, end);
          if (to > i + 32) to = i + 32;
          appendLatin1(m, buf + i, to - i);
          m += "' for " + letterName(letter) + "; word ignored.";
          warn("malformed-number", std::move(m));
        }
        i = skipWord(buf, j, end);
        continue;
      }
      const double v = numVal_;
      i = j;
      if (letter == L_M && firstWord_ && isTextArgMcode(v)) {
        // M117 and friends carry free text: stop parsing words.
        storeWord(letter, v);
        while (i < end && buf[i] != LF) i++;
        continue;
      }
      storeWord(letter, v);
      continue;
    }
    if (cls == K_BLANK) {  // SPACE or TAB
      i++;
      continue;
    }
    if (cls == K_LF) break;
    if (cls == K_CR) {
      // A CR inside a line is a line break (lone-CR files); a trailing CR of CRLF ends nothing new.
      execute();
      beginStatement();
      i++;
      if (i < end && buf[i] != LF) {
        lineNo_++;
        stats_.lines++;
        stmtStart = i;
      }
      continue;
    }
    if (cls == K_SEMI) {
      // Comment to the end of the line (or to a lone CR).
      size_t j = i + 1;
      while (j < end && buf[j] != CR && buf[j] != LF) j++;
      handleComment(buf, i + 1, j);
      i = j;
      continue;
    }
    if (cls == K_LPAREN) {
      size_t j = i + 1;
      while (j < end && buf[j] != RPAREN && buf[j] != CR && buf[j] != LF) j++;
      handleComment(buf, i + 1, j);
      i = j < end && buf[j] == RPAREN ? j + 1 : j;
      continue;
    }
    if (cls == K_STAR) {
      i = checksum(buf, stmtStart, i, end);
      continue;
    }
    if (warnSlot()) {
      std::string m = "Line " + jsNumber(lineNo_) + ": unexpected character '";
      appendLatin1(m, &c, 1);
      m += "' ignored.";
      warn("bad-character", std::move(m));
    }
    i = skipWord(buf, i, end);
  }
  execute();
  return i;
}

// Parses the complete lines of [start, end), where end − 1 is an LF, and returns how many there
// were. A line longer than MAX_LINE_BYTES is read to that length and reported as LineSplitter
// would report it.
double Parser::lines(const uint8_t* buf, size_t start, size_t end) {
  size_t s = start;
  double n = 0;
  while (s < end) {
    const size_t limit = end - s > MAX_LINE ? s + MAX_LINE : end;
    const double lineNo = lineNo_ + 1;
    const size_t warningsBefore = warnings_.size();
    const size_t stop = lineImpl(buf, s, limit);
    n++;
    if (stop < limit || (stop < end && buf[stop] == LF)) {
      s = stop + 1;
      continue;
    }
    if (stop >= end) break;  // no LF at end − 1 (outside the contract): nothing left to read
    // Longer than the limit: the rest up to the LF is dropped, as LineSplitter does.
    const void* lfp = std::memchr(buf + stop, LF, end - stop);
    const size_t lf = lfp != nullptr ? static_cast<size_t>(static_cast<const uint8_t*>(lfp) - buf) : end;
    noteLongLine(static_cast<double>(lf - s), lineNo, warningsBefore);
    s = lf + 1;
  }
  return n;
}

// Counts a cut line and files its warning at index `at` of the list (where it belongs in line
// order), within the list's cap.
void Parser::noteLongLine(double bytes, double lineNo, size_t at) {
  stats_.longLines++;
  stats_.warningsTotal++;
  if (static_cast<double>(at) >= maxWarnings_) return;
  if (at > warnings_.size()) at = warnings_.size();
  warnings_.insert(warnings_.begin() + static_cast<ptrdiff_t>(at),
                   ParserWarning{"long-line", lineNo,
                                 "Line " + jsNumber(lineNo) + " is " + jsNumber(bytes) +
                                     " bytes long; only its first 64 KB were read."});
  if (static_cast<double>(warnings_.size()) > maxWarnings_) warnings_.pop_back();
}

void Parser::beginStatement() {
  mask_ = 0;
  nG_ = 0;
  nM_ = 0;
  toolWordFirst_ = false;
  firstWord_ = true;
  trailingComment_ = false;
  trailingFeature_ = kFeatureNone;
}

inline void Parser::storeWord(int letter, double v) {
  if (letter == L_N && firstWord_) return;  // line number: strip (RepRap wiki "N: Line number")
  if (letter == L_G) {
    if (nG_ < 8) gCodes_[nG_++] = v;
  } else if (letter == L_M) {
    if (nM_ < 8) mCodes_[nM_++] = v;
  } else {
    if (letter == L_T && firstWord_) toolWordFirst_ = true;
    vals_[letter] = v;
    mask_ |= 1u << letter;
  }
  firstWord_ = false;
}

// Adds the run of ASCII digits at buf[i…] to mant (mant · 10 + digit each; past nine digits the
// sum wraps and the caller discards it); returns the index after the run.
static HOTLAP_INLINE size_t addDigits(const uint8_t* buf, size_t i, size_t end, uint32_t& mant) {
  while (i < end) {
    const uint32_t d = static_cast<uint32_t>(buf[i]) - D0;
    if (d > 9) break;
    mant = mant * 10 + d;
    i++;
  }
  return i;
}

// Parses [+-]digits[.digits] into numVal_; returns the index after it, or kNone when no digits.
// C++ only, same value: the TypeScript's single loop (a digit or the first dot per step, the
// first nine digits summed in int32, then readLongNumber() in doubles) is split into an
// integer-digit loop and a fraction-digit loop, so a digit costs one range test; they scan the
// same bytes. Numbers of more than nine digits are scanned again by readNumberTs(), the
// TypeScript loop itself (the sum here may have wrapped, it is then unused). The exponent test
// made at the end of the TypeScript readNumber()/readLongNumber() is made by the caller,
// lineImpl(), when a letter follows the digits (it is false otherwise).
HOTLAP_INLINE size_t Parser::readNumber(const uint8_t* buf, size_t i, size_t end) {
  bool neg = false;
  if (i < end && (buf[i] == MINUS || buf[i] == PLUS)) {
    neg = buf[i] == MINUS;
    i++;
  }
  const size_t digitsAt = i;
  uint32_t mant = 0;
  i = addDigits(buf, i, end, mant);
  size_t nd = i - digitsAt;
  size_t fd = 0;
  if (i < end && buf[i] == DOT) {
    const size_t fracAt = i + 1;
    i = addDigits(buf, fracAt, end, mant);
    fd = i - fracAt;
    nd += fd;
  }
  if (nd > 9) return readNumberTs(buf, digitsAt, end, neg);
  if (nd == 0) {
    numVal_ = NAN;
    return kNone;
  }
  // One division of exact integers is correctly rounded (fd ≤ 9 here: fraction digits are digits).
  const double m = static_cast<int32_t>(mant);
  const double v = fd > 0 ? m / kPow10Small[fd] : m;
  numVal_ = neg ? -v : v;
  return i;
}

// The TypeScript readNumber() loop, for numbers of more than nine digits (i is past the sign): the
// first nine digits are summed in int32 (exact), then readLongNumber() goes on in doubles.
size_t Parser::readNumberTs(const uint8_t* buf, size_t i, size_t end, bool neg) {
  int32_t mant = 0;
  int nd = 0;
  ptrdiff_t dotAt = -1;
  while (i < end) {
    const int d = buf[i] - D0;
    if (d >= 0 && d <= 9) {
      if (nd == 9) return readLongNumber(buf, i, end, neg, dotAt, mant);
      mant = mant * 10 + d;
      nd++;
    } else if (d == DOT - D0 && dotAt < 0) {
      dotAt = static_cast<ptrdiff_t>(i);
    } else {
      break;
    }
    i++;
  }
  // Not reached: readNumber() counted more than nine digits, so the loop returns at the tenth.
  return readLongNumber(buf, i, end, neg, dotAt, mant);
}

// readNumber() past nine digits: goes on in doubles from the same exact value.
size_t Parser::readLongNumber(const uint8_t* buf, size_t i, size_t end, bool neg, ptrdiff_t dotAt, double mant) {
  while (i < end) {
    const int d = buf[i] - D0;
    if (d >= 0 && d <= 9) mant = mant * 10 + d;
    else if (d == DOT - D0 && dotAt < 0) dotAt = static_cast<ptrdiff_t>(i);
    else break;
    i++;
  }
  const ptrdiff_t fd = dotAt >= 0 ? static_cast<ptrdiff_t>(i) - dotAt - 1 : -1;
  const double v = fd > 0 ? mant / jsPow10(static_cast<double>(fd)) : mant;
  numVal_ = neg ? -v : v;
  return i;
}

// An exponent after the number in numVal_ ("1e308"): read only for a space-separated word whose
// exponent is followed by a separator; otherwise 'E' starts the next word, as in Marlin's parser,
// which strips 'E' so "X10E5" is X10 E5 (Marlin GCodeParser::value_float).
size_t Parser::readExponent(const uint8_t* buf, size_t i, size_t end) {
  size_t k = i + 1;
  bool eneg = false;
  if (buf[k] == MINUS || buf[k] == PLUS) {
    eneg = buf[k] == MINUS;
    k++;
  }
  int ex = 0;
  size_t ed = 0;
  while (k < end && buf[k] >= D0 && buf[k] <= D9) {
    if (ex < 10000) ex = ex * 10 + (buf[k] - D0);
    ed++;
    k++;
  }
  if (ed > 0 && (k >= end || isTerminator(buf[k]))) {
    numVal_ = numVal_ * jsPow10(eneg ? -ex : ex);
    return k;
  }
  return i;
}

size_t Parser::checksum(const uint8_t* buf, size_t stmtStart, size_t star, size_t end) {
  size_t j = star + 1;
  double want = 0;
  double nd = 0;
  while (j < end && buf[j] >= D0 && buf[j] <= D9) {
    want = want * 10 + (buf[j] - D0);
    nd++;
    j++;
  }
  if (verifyChecksums_) {
    // RepRap wiki "Checking": XOR of every byte before '*', including the N word.
    int cs = 0;
    for (size_t k = stmtStart; k < star; k++) cs ^= buf[k];
    if (nd == 0 || (cs & 0xff) != want) {
      stats_.checksumErrors++;
      if (warnSlot())
        warn("checksum", "Line " + jsNumber(lineNo_) + ": checksum " + (nd != 0 ? jsNumber(want) : "(missing)") +
                             " does not match the line (expected " + std::to_string(cs & 0xff) + ").");
    }
  }
  // Anything after the checksum up to a comment is ignored.
  while (j < end && buf[j] != SEMI && buf[j] != CR && buf[j] != LF) j++;
  return j;
}

void Parser::handleComment(const uint8_t* buf, size_t s, size_t e) {
  // Trim.
  while (s < e && (buf[s] == SPACE || buf[s] == TAB)) s++;
  while (e > s && (buf[e - 1] == SPACE || buf[e - 1] == TAB || buf[e - 1] == CR)) e--;
  if (e <= s) return;
  // ";TYPE:" (PrusaSlicer, Slic3r PE, CuraEngine) or ";FEATURE:" sets the feature of following moves.
  const bool isType =
      e - s > 5 && (buf[s] == 84 && buf[s + 1] == 89 && buf[s + 2] == 80 && buf[s + 3] == 69 && buf[s + 4] == 58);
  const bool isFeature = !isType && e - s > 8 && buf[s] == 70 && buf[s + 1] == 69 && buf[s + 2] == 65 &&
                         buf[s + 3] == 84 && buf[s + 4] == 85 && buf[s + 5] == 82 && buf[s + 6] == 69 &&
                         buf[s + 7] == 58;
  if (!wantsComments_ && !isType && !isFeature && (firstWord_ || labelsSeen_)) return;
  if (isType || isFeature) {
    int f;
    // text.slice(5) / slice(8): "TYPE:" and "FEATURE:" are ASCII, one UTF-16 unit per byte.
    f = featureFromLabelAt(buf, s + (isType ? 5 : 8), e, scratch_);
    feature_ = f;
    labelsSeen_ = true;
    stats_.featureLabels++;
  } else if (!firstWord_ && !labelsSeen_) {
    trailingComment_ = true;
    trailingFeature_ = featureFromVerboseComment(buf + s, e - s, scratch_);
  }
  if (wantsComments_) sink_.comment(reinterpret_cast<const char*>(buf + s), e - s, lineNo_);
}

// Klipper-style extended command: NAME KEY=VALUE …
size_t Parser::textCommand(const uint8_t* buf, size_t i, size_t end) {
  size_t j = i;
  while (j < end && buf[j] != SPACE && buf[j] != TAB && buf[j] != SEMI && buf[j] != CR && buf[j] != LF) j++;
  std::string& name = scratch_;
  name.clear();
  appendLatin1Upper(name, buf + i, j - i);
  firstWord_ = false;
  stats_.commands++;
  stats_.textCommands++;
  // Find end of statement (before a comment).
  size_t k = j;
  while (k < end && buf[k] != SEMI && buf[k] != CR && buf[k] != LF) k++;
  if (name == "SET_VELOCITY_LIMIT") {
    setVelocityLimit(buf, j, k);
  } else if (name == "SET_RETRACTION") {
    static const char* const kKeys[] = {"RETRACT_LENGTH", "RETRACT_SPEED"};
    std::optional<double> args[2];
    parseKeyValues(buf, j, k, kKeys, args);
    const std::optional<double>& len = args[0];
    const std::optional<double>& spd = args[1];
    if (len && *len >= 0 && *len < 100) fwRetractMm_ = *len;
    if (spd && *spd >= MIN_FEED_LIMIT_MMS && *spd < 1000) fwRetractFeedMms_ = *spd;
  } else if (!knownNoEffectText(name)) {
    countUnknown(name);
  }
  return k;
}

void Parser::setVelocityLimit(const uint8_t* buf, size_t s, size_t e) {
  MachineState& m = machine_;
  static const char* const kKeys[] = {"ACCEL", "SQUARE_CORNER_VELOCITY", "VELOCITY", "ACCEL_TO_DECEL",
                                      "MINIMUM_CRUISE_RATIO"};
  std::optional<double> args[5];
  parseKeyValues(buf, s, e, kKeys, args);
  const auto& accel = args[0];
  const auto& scv = args[1];
  const auto& vel = args[2];
  const auto& a2d = args[3];
  const auto& mcr = args[4];
  if (accel && sane("ACCEL", *accel, MIN_ACCEL, MAX_LIMIT)) {
    m.accelPrintMms2 = *accel;
    m.accelTravelMms2 = *accel;
  }
  if (scv && sane("SQUARE_CORNER_VELOCITY", *scv, -1, 1e4)) m.squareCornerVelocityMms = *scv;
  if (vel && sane("VELOCITY", *vel, MIN_FEED_LIMIT_MMS, 1e5)) m.maxVelocityMms = *vel;
  if (a2d && sane("ACCEL_TO_DECEL", *a2d, MIN_ACCEL, MAX_LIMIT)) m.accelToDecelMms2 = *a2d;
  if (mcr && sane("MINIMUM_CRUISE_RATIO", *mcr, -1, 1)) m.minimumCruiseRatio = *mcr;
  m.mark(kMarkSetVelocityLimit);
  m.version++;
}

// True when min < v ≤ max and finite; otherwise a warning.
bool Parser::sane(const char* what, double v, double min, double max) {
  if (std::isfinite(v) && v > min && v <= max) return true;
  if (warnSlot())
    warn("absurd-value", "Line " + jsNumber(lineNo_) + ": " + what + " " + jsNumber(v) + " is out of range; ignored.");
  return false;
}

void Parser::countUnknown(const std::string& name) {
  stats_.unknownCommandCount++;
  auto& u = stats_.unknownCommands;
  for (auto& kv : u) {
    if (kv.first == name) {
      kv.second++;
      return;
    }
  }
  if (u.size() < 64) u.emplace_back(name, 1);
}

// Value of a present word with a finite number, else NaN (with a warning if it was present but bad).
double Parser::num(int letter) {
  if ((mask_ & (1u << letter)) == 0) return NAN;
  const double v = vals_[letter];
  if (v != v) noNumber(letter);
  return v;
}

void Parser::noNumber(int letter) {
  if (warnSlot())
    warn("malformed-number", "Line " + jsNumber(lineNo_) + ": " + letterName(letter) + " has no valid number; ignored.");
}

// Words with no G, M or T command and no motion mode to repeat (e.g. "Q77"): they do nothing.
void Parser::noCommand() {
  if (!warnSlot()) return;
  std::string letters;
  for (int l = 0; l < 26; l++)
    if (mask_ & (1u << l)) letters += static_cast<char>(65 + l);
  warn("no-command", "Line " + jsNumber(lineNo_) + ": " + (letters.size() > 1 ? "words " : "word ") + letters +
                         " without a G, M or T command (or a motion mode to repeat); ignored.");
}

void Parser::gCode(double g) {
  const int gi = codeInt(g);
  switch (gi) {
    case 20:
      unitMm_ = 25.4;  // NISTIR 6556 §3.5.11: G20 inch units
      return;
    case 21:
      unitMm_ = 1;
      return;
    case 90:
      // NISTIR 6556 §3.5.16 absolute distance mode. E follows M82/M83 again (Klipper gcode_move; RepRap wiki G90).
      axisRelative_ = false;
      return;
    case 91:
      // Relative mode; in Marlin and Klipper G91 makes E relative too (Marlin G91 reference).
      axisRelative_ = true;
      return;
    case 92:
      setPosition();
      return;
    case 28:
      home();
      return;
    case 4:
      dwell();
      return;
    case 10:
      if (has(L_L) || has(L_P)) return;  // RS274 G10 L2/L20: coordinate system data, no motion
      firmwareRetract();
      return;
    case 11:
      firmwareRecover();
      return;
    case 17:
    case 18:
    case 19:
      plane_ = g;
      return;
    default:
      if (!knownNoEffectG(gi)) countUnknown("G" + jsNumber(g));
  }
}

void Parser::mCode(double m) {
  const int mi = codeInt(m);
  switch (mi) {
    case 82:
      eModeRelative_ = false;  // RepRap wiki M82: absolute extrusion
      return;
    case 83:
      eModeRelative_ = true;  // RepRap wiki M83: relative extrusion
      return;
    case 220:
      setSpeedFactor();
      return;
    case 221:
      setFlowFactor();
      return;
    case 204:
      m204();
      return;
    case 205:
      m205();
      return;
    case 201:
      m201();
      return;
    case 203:
      m203();
      return;
    case 207: {
      // Marlin M207: S length (mm), F feed (mm/min), Z lift.
      if (double v = limit("M207", L_S, -1e-9, 100); v == v) fwRetractMm_ = v;
      const double f = limit("M207", L_F, MIN_FEED_MM_MIN, MAX_FEED_MM_MIN);
      if (f == f) fwRetractFeedMms_ = f / 60;
      return;
    }
    case 208: {
      // Marlin M208: S extra recover length (mm), F recover feed (mm/min).
      if (double v = limit("M208", L_S, -100, 100); v == v) fwRecoverExtraMm_ = v;
      const double f = limit("M208", L_F, MIN_FEED_MM_MIN, MAX_FEED_MM_MIN);
      if (f == f) fwRecoverFeedMms_ = f / 60;
      return;
    }
    case 104:
    case 109: {
      const double s = has(L_S) ? vals_[L_S] : has(L_R) ? vals_[L_R] : NAN;
      if (s == s && s >= 0 && s < 1000) {
        if (!stats_.nozzleTempMaxC || s > *stats_.nozzleTempMaxC) stats_.nozzleTempMaxC = s;
      }
      return;
    }
    case 140:
    case 190: {
      const double s = has(L_S) ? vals_[L_S] : has(L_R) ? vals_[L_R] : NAN;
      if (s == s && s >= 0 && s < 1000) {
        if (!stats_.bedTempMaxC || s > *stats_.bedTempMaxC) stats_.bedTempMaxC = s;
      }
      return;
    }
    case 106: {
      const double s = has(L_S) ? vals_[L_S] : 255;
      if (s == s && s >= 0) {
        const double pct = jsMin(100, (s <= 1 && s > 0 && !isInteger(s) ? s * 255 : s) / 2.55);
        if (!stats_.fanMaxPercent || pct > *stats_.fanMaxPercent) stats_.fanMaxPercent = pct;
      }
      return;
    }
    default:
      if (!knownNoEffectM(mi)) countUnknown("M" + jsNumber(m));
  }
}

void Parser::toolChange(double t) {
  if (!(t == t) || t < 0 || t >= kMaxTools || !isInteger(t)) {
    if (warnSlot())
      warn("bad-tool", "Line " + jsNumber(lineNo_) + ": tool number " + jsNumber(t) + " is not supported (T0\xE2\x80\x93T" +
                           std::to_string(kMaxTools - 1) + "); ignored.");
    return;
  }
  tool_ = t;
  const double key = t == 0 ? 0 : t;  // a Set stores −0 as +0
  for (double u : stats_.toolsUsed)
    if (u == key) return;
  stats_.toolsUsed.push_back(key);
}

// Marlin M220 S<percent>; B/R back up and restore the factor.
void Parser::setSpeedFactor() {
  if (has(L_S)) {
    const double s = num(L_S);
    if (s == s && sane("M220 S", s, 0.999, 10000)) {
      speedFactor_ = s / 100;
      recordOverride(stats_.speedFactor, s, lineNo_);
    }
  } else if (has(L_R)) {
    speedFactor_ = savedSpeedFactor_;
    recordOverride(stats_.speedFactor, speedFactor_ * 100, lineNo_);
  } else if (has(L_B)) {
    savedSpeedFactor_ = speedFactor_;
  }
}

// Marlin M221 S<percent> [T<tool>]: flow factor of a tool's extruder.
void Parser::setFlowFactor() {
  if (!has(L_S)) return;
  const double s = num(L_S);
  if (!(s == s) || !sane("M221 S", s, 0, 10000)) return;
  double t = tool_;
  if (has(L_T)) {
    const double tv = vals_[L_T];
    if (tv == tv && tv >= 0 && tv < kMaxTools && isInteger(tv)) t = tv;
  }
  flowFactor_[static_cast<int>(t)] = s / 100;
  recordOverride(stats_.flowFactor, s, lineNo_);
}

// A limit word's value if present and within (min, max]; NaN for null (a usable limit is never
// NaN), with a warning if the word is bad. A double rather than std::optional: cheaper per M204.
double Parser::limit(const char* cmd, int letter, double min, double max) {
  const double v = num(letter);
  if (v != v) return NAN;
  if (v > min && v <= max) return v;
  badLimit(cmd, letter, v, min, max);
  return NAN;
}

void Parser::badLimit(const char* cmd, int letter, double v, double min, double max) {
  sane((std::string(cmd) + " " + letterName(letter)).c_str(), v, min, max);  // warns
}

void Parser::m204() {
  MachineState& m = machine_;
  // Marlin M204: P printing, R retract, T travel; S sets printing and travel (legacy). Klipper: S, or min(P,T).
  const double s = limit("M204", L_S, MIN_ACCEL, MAX_LIMIT);
  if (s == s) {
    m.accelPrintMms2 = s;
    m.accelTravelMms2 = s;
  }
  if (double v = limit("M204", L_P, MIN_ACCEL, MAX_LIMIT); v == v) m.accelPrintMms2 = v;
  if (double v = limit("M204", L_R, MIN_ACCEL, MAX_LIMIT); v == v) m.accelRetractMms2 = v;
  if (double v = limit("M204", L_T, MIN_ACCEL, MAX_LIMIT); v == v) m.accelTravelMms2 = v;
  m.accelWrites++;
  // Accelerations are read by the planner on every move, so no version bump (slicers send M204 per feature).
  m.mark(kMarkM204);
}

void Parser::m205() {
  MachineState& m = machine_;
  // Marlin M205: X/Y/Z/E jerk in mm/s, J junction deviation in mm.
  if (double v = limit("M205", L_X, -1e-9, 1e4); v == v) m.jerkXMms = v;
  if (double v = limit("M205", L_Y, -1e-9, 1e4); v == v) m.jerkYMms = v;
  if (double v = limit("M205", L_Z, -1e-9, 1e4); v == v) m.jerkZMms = v;
  if (double v = limit("M205", L_E, -1e-9, 1e4); v == v) m.jerkEMms = v;
  if (double v = limit("M205", L_J, -1e-9, 10); v == v) m.junctionDeviationMm = v;
  m.mark(kMarkM205);
  m.version++;
}

void Parser::m201() {
  MachineState& m = machine_;
  // Marlin M201: per-axis max acceleration, mm/s².
  if (double v = limit("M201", L_X, MIN_ACCEL, MAX_LIMIT); v == v) m.maxAccelXMms2 = v;
  if (double v = limit("M201", L_Y, MIN_ACCEL, MAX_LIMIT); v == v) m.maxAccelYMms2 = v;
  if (double v = limit("M201", L_Z, MIN_ACCEL, MAX_LIMIT); v == v) m.maxAccelZMms2 = v;
  if (double v = limit("M201", L_E, MIN_ACCEL, MAX_LIMIT); v == v) m.maxAccelEMms2 = v;
  m.mark(kMarkM201);
  m.version++;
}

void Parser::m203() {
  MachineState& m = machine_;
  // Marlin M203: per-axis max feed, mm/s.
  if (double v = limit("M203", L_X, MIN_FEED_LIMIT_MMS, 1e5); v == v) m.maxFeedXMms = v;
  if (double v = limit("M203", L_Y, MIN_FEED_LIMIT_MMS, 1e5); v == v) m.maxFeedYMms = v;
  if (double v = limit("M203", L_Z, MIN_FEED_LIMIT_MMS, 1e5); v == v) m.maxFeedZMms = v;
  if (double v = limit("M203", L_E, MIN_FEED_LIMIT_MMS, 1e5); v == v) m.maxFeedEMms = v;
  m.mark(kMarkM203);
  m.version++;
}

// G92: set the logical position without moving (RepRap wiki G92); no axis words = all axes to 0.
void Parser::setPosition() {
  const bool any = (mask_ & AXES_MASK) != 0;
  const double u = unitMm_;
  if (!any) {
    ox_ = px_;
    oy_ = py_;
    oz_ = pz_;
    eLogical_ = 0;
    return;
  }
  const double* vals = vals_;
  if (coordOk(L_X, MAX_COORD_MM)) ox_ = px_ - vals[L_X] * u;
  if (coordOk(L_Y, MAX_COORD_MM)) oy_ = py_ - vals[L_Y] * u;
  if (coordOk(L_Z, MAX_COORD_MM)) oz_ = pz_ - vals[L_Z] * u;
  if (coordOk(L_E, MAX_E_MM)) eLogical_ = vals[L_E] * u;
}

// G28: homed axes go to 0 and lose their G92 offset (Marlin G28). No axis words = all.
void Parser::home() {
  const bool any = (mask_ & (BIT(L_X) | BIT(L_Y) | BIT(L_Z))) != 0;
  if (!any || has(L_X)) {
    px_ = 0;
    ox_ = 0;
  }
  if (!any || has(L_Y)) {
    py_ = 0;
    oy_ = 0;
  }
  if (!any || has(L_Z)) {
    pz_ = 0;
    oz_ = 0;
  }
}

void Parser::dwell() {
  // G4 P<ms> or S<s> (RepRap wiki G4; Marlin P is milliseconds).
  double t = 0;
  const double p = num(L_P);
  const double s = num(L_S);
  if (s == s) t = s;
  else if (p == p) t = p / 1000;
  if (t > 0 && t < 1e6) sink_.dwell(t, lineNo_);
  else if (t != 0) {
    if (warnSlot()) warn("absurd-value", "Line " + jsNumber(lineNo_) + ": dwell of " + jsNumber(t) + " s ignored.");
  }
}

void Parser::firmwareRetract() {
  if (fwRetracted_) return;  // Marlin ignores a repeated G10
  fwRetracted_ = true;
  stats_.firmwareRetractions++;
  emitStationaryE(-fwRetractMm_, fwRetractFeedMms_);
}

void Parser::firmwareRecover() {
  if (!fwRetracted_) return;
  fwRetracted_ = false;
  emitStationaryE(fwRetractMm_ + fwRecoverExtraMm_, fwRecoverFeedMms_);
}

void Parser::emitStationaryE(double eMm, double feedMms) {
  if (eMm == 0) return;
  Segment& s = seg_;
  s.x0 = s.x1 = px_;
  s.y0 = s.y1 = py_;
  s.z0 = s.z1 = pz_;
  s.lengthMm = 0;
  s.eMm = eMm * flowFactor_[static_cast<int>(tool_)];
  s.feedMms = feedMms;
  s.extruding = false;
  s.feature = feature_;
  s.tool = static_cast<int>(tool_);
  s.lineNo = lineNo_;
  stats_.moves++;
  sink_.segment(s);
}

// True when the axis word is present with a finite value within ±maxAbs (read it from vals_);
// a present but bad word gives a warning.
HOTLAP_INLINE bool Parser::coordOk(int letter, double maxAbs) {
  if ((mask_ & (1u << letter)) == 0) return false;
  const double v = vals_[letter];
  if (v >= -maxAbs && v <= maxAbs) return true;  // the common case: one range test (false for NaN)
  badCoord(letter, maxAbs);
  return false;
}

// Warns about an F word that is not a number or not a usable speed (the feed stays as it was).
void Parser::badFeed() {
  const double f = vals_[L_F];
  if (!warnSlot()) return;
  if (!(f == f)) warn("malformed-number", "Line " + jsNumber(lineNo_) + ": F has no valid number; ignored.");
  else warn("absurd-value", "Line " + jsNumber(lineNo_) + ": feed F" + jsNumber(f) + " is not a usable speed; ignored.");
}

// Warns about a present axis word that is not a number or out of ±maxAbs.
void Parser::badCoord(int letter, double maxAbs) {
  const double v = vals_[letter];
  if (v != v) {
    if (warnSlot())
      warn("malformed-number", "Line " + jsNumber(lineNo_) + ": " + letterName(letter) + " has no valid number; ignored.");
  } else if (!(std::fabs(v) <= maxAbs)) {
    if (warnSlot())
      warn("absurd-value",
           "Line " + jsNumber(lineNo_) + ": " + letterName(letter) + jsNumber(v) + " is out of range; ignored.");
  }
}

HOTLAP_INLINE void Parser::motion(double mode) {
  // Feed (modal, shared by G0 and G1 in printer firmware).
  const double u = unitMm_;
  if (has(L_F)) {
    const double f = vals_[L_F] * u;
    if (f >= MIN_FEED_MM_MIN && f <= MAX_FEED_MM_MIN) feedMmMin_ = f;
    else badFeed();
  }
  const bool rel = axisRelative_;
  double tx = px_;
  double ty = py_;
  double tz = pz_;
  const double* vals = vals_;
  if (coordOk(L_X, MAX_COORD_MM)) tx = rel ? px_ + vals[L_X] * u : vals[L_X] * u + ox_;
  if (coordOk(L_Y, MAX_COORD_MM)) ty = rel ? py_ + vals[L_Y] * u : vals[L_Y] * u + oy_;
  if (coordOk(L_Z, MAX_COORD_MM)) tz = rel ? pz_ + vals[L_Z] * u : vals[L_Z] * u + oz_;
  double de = 0;
  if (coordOk(L_E, MAX_E_MM)) {
    const double ve = vals[L_E] * u;
    if (rel || eModeRelative_) {
      de = ve;
      eLogical_ += ve;
    } else {
      de = ve - eLogical_;
      eLogical_ = ve;
    }
  }
  if (mode >= 2) {
    arc(mode == 2, tx, ty, tz, de);
    return;
  }
  tx_ = tx;
  ty_ = ty;
  tz_ = tz;
  tde_ = de;
  emit();
}

// Straight move to (tx, ty, tz) feeding de mm of filament (arc chords and fallbacks).
void Parser::linear(double tx, double ty, double tz, double de) {
  tx_ = tx;
  ty_ = ty;
  tz_ = tz;
  tde_ = de;
  emit();
}

// Emits the straight move to the target fields.
HOTLAP_INLINE void Parser::emit() {
  const double tx = tx_;
  const double ty = ty_;
  const double tz = tz_;
  const double de = tde_;
  const double dx = tx - px_;
  const double dy = ty - py_;
  const double dz = tz - pz_;
  const double len = std::sqrt(dx * dx + dy * dy + dz * dz);
  if (len == 0 && de == 0) return;
  Segment& s = seg_;
  s.x0 = px_;
  s.y0 = py_;
  s.z0 = pz_;
  s.x1 = tx;
  s.y1 = ty;
  s.z1 = tz;
  s.lengthMm = len;
  s.eMm = de * flowFactor_[static_cast<int>(tool_)];
  s.feedMms = (feedMmMin_ / 60) * speedFactor_;
  s.extruding = s.eMm > 0 && len > 0;
  s.feature = trailingComment_ && trailingFeature_ != kFeatureNone ? trailingFeature_ : feature_;
  s.tool = static_cast<int>(tool_);
  s.lineNo = lineNo_;
  px_ = tx;
  py_ = ty;
  pz_ = tz;
  stats_.moves++;
  sink_.segment(s);
}

// (C++: defined after motion() and emit(), which are inlined into it.)
void Parser::execute() {
  const int nG = nG_;
  const int nM = nM_;
  if (nG == 0 && nM == 0) {
    if (toolWordFirst_) {
      stats_.commands++;
      toolChange(vals_[L_T]);
      return;
    }
    if ((mask_ & (AXES_MASK | BIT(L_F))) != 0 && motionMode_ >= 0) {
      // Modal motion: axis words alone repeat the current motion mode (NISTIR 6556 §3.5.1 "motion mode").
      stats_.commands++;
      motion(motionMode_);
    } else if (mask_ != 0) {
      noCommand();
    }
    return;
  }
  stats_.commands++;
  // Non-motion G codes first (units, distance mode), motion last (NISTIR 6556 §3.8 "order of execution").
  double mot = -1;
  for (int k = 0; k < nG; k++) {
    const double g = gCodes_[k];
    // (C++: G1, the most common, is tested first; same set as g === 0 || 1 || 2 || 3.)
    if (g == 1 || g == 0 || g == 2 || g == 3) mot = g;
    else gCode(g);
  }
  if (mot >= 0) {
    motionMode_ = mot;
    motion(mot);
  }
  for (int k = 0; k < nM; k++) mCode(mCodes_[k]);
}

// G2 (clockwise) / G3 (counter-clockwise) in the XY plane, centre from I/J (offsets from the start,
// NISTIR 6556 §3.5.3.1 "center format") or radius R (§3.5.3.2 "radius format": positive R = arc of
// at most 180°, negative R = more than 180°). Split into chords whose sagitta r(1 − cos(θ/2)) stays
// within the arc tolerance; Z (helix) and E are spread evenly along the angle.
void Parser::arc(bool cw, double tx, double ty, double tz, double de) {
  stats_.arcs++;
  if (plane_ != 17) {
    if (warnSlot())
      warn("arc-plane", "Line " + jsNumber(lineNo_) + ": arcs outside the XY plane (G" + jsNumber(plane_) +
                            ") are measured as straight lines.");
    linear(tx, ty, tz, de);
    return;
  }
  const double sx = px_;
  const double sy = py_;
  const double u = unitMm_;
  double cx;
  double cy;
  if (has(L_R)) {
    const double r0 = vals_[L_R];
    if (!(r0 == r0) || !(std::fabs(r0) <= MAX_COORD_MM) || r0 == 0) {
      if (warnSlot())
        warn("bad-arc", "Line " + jsNumber(lineNo_) + ": arc radius R is missing or invalid; measured as a straight line.");
      linear(tx, ty, tz, de);
      return;
    }
    const double r = r0 * u;
    const double dx = tx - sx;
    const double dy = ty - sy;
    const double d = std::sqrt(dx * dx + dy * dy);
    if (d == 0) {
      if (warnSlot())
        warn("bad-arc", "Line " + jsNumber(lineNo_) + ": an R-form arc cannot end where it starts; ignored as a move.");
      linear(tx, ty, tz, de);
      return;
    }
    double h2 = r * r - (d * d) / 4;
    if (h2 < 0) {
      if (h2 < -1e-3 * r * r) {
        if (warnSlot())
          warn("bad-arc", "Line " + jsNumber(lineNo_) + ": arc radius " + jsNumber(std::fabs(r0)) +
                              " is too small for its end point; measured as a straight line.");
        linear(tx, ty, tz, de);
        return;
      }
      h2 = 0;
    }
    const double h = std::sqrt(h2);
    // Centre to the right of the chord for CW with R>0, to the left for CCW; negative R flips it.
    double side = cw ? 1 : -1;
    if (r < 0) side = -side;
    cx = sx + dx / 2 + (side * h * dy) / d;
    cy = sy + dy / 2 - (side * h * dx) / d;
  } else {
    const double i = has(L_I) ? vals_[L_I] : 0;
    const double j = has(L_J) ? vals_[L_J] : 0;
    if (!(i == i) || !(j == j) || std::fabs(i) > MAX_COORD_MM || std::fabs(j) > MAX_COORD_MM || (i == 0 && j == 0)) {
      if (warnSlot())
        warn("bad-arc", "Line " + jsNumber(lineNo_) + ": arc centre I/J is missing or invalid; measured as a straight line.");
      linear(tx, ty, tz, de);
      return;
    }
    cx = sx + i * u;
    cy = sy + j * u;
  }
  const double r = jsHypot(sx - cx, sy - cy);
  const double a0 = std::atan2(sy - cy, sx - cx);  // Math.atan2: may differ by one ulp
  const double a1 = std::atan2(ty - cy, tx - cx);
  const double TWO_PI = 2 * M_PI;
  double sweep = cw ? a0 - a1 : a1 - a0;
  while (sweep <= 1e-12) sweep += TWO_PI;
  while (sweep > TWO_PI + 1e-12) sweep -= TWO_PI;
  if (std::fabs(tx - sx) < 1e-9 && std::fabs(ty - sy) < 1e-9) sweep = TWO_PI;  // full circle
  const double tol = arcTolMm_;
  const double maxStep = tol >= r ? M_PI / 2 : jsMin(M_PI / 2, 2 * std::acos(1 - tol / r));  // Math.acos
  double n = std::ceil(sweep / maxStep);
  if (!(n >= 1)) n = 1;
  if (n > MAX_ARC_CHORDS) n = MAX_ARC_CHORDS;
  const double r1 = jsHypot(tx - cx, ty - cy);
  const double z0 = pz_;
  const double dir = cw ? -1 : 1;
  const double dePer = de / n;
  for (double k = 1; k <= n; k++) {
    double x;
    double y;
    if (k == n) {
      x = tx;
      y = ty;
    } else {
      const double f = k / n;
      const double a = a0 + dir * sweep * f;
      const double rk = r + (r1 - r) * f;
      x = cx + rk * std::cos(a);  // Math.cos / Math.sin: may differ by one ulp
      y = cy + rk * std::sin(a);
    }
    linear(x, y, z0 + ((tz - z0) * k) / n, dePer);
  }
}

namespace {

void writeOverride(Json& j, const OverrideStats& o) {
  j.beginObject();
  j.key("max");
  if (o.max) j.beginObject().key("percent").num(o.max->percent).key("lineNo").num(o.max->lineNo).endObject();
  else j.null();
  j.key("min");
  if (o.min) j.beginObject().key("percent").num(o.min->percent).key("lineNo").num(o.min->lineNo).endObject();
  else j.null();
  j.key("count").num(o.count);
  j.endObject();
}

}  // namespace

void Parser::toJson(Json& j) const {
  const ParserStats& st = stats_;
  j.beginObject();
  j.key("stats").beginObject();
  j.key("lines").num(st.lines);
  j.key("commands").num(st.commands);
  j.key("moves").num(st.moves);
  j.key("arcs").num(st.arcs);
  j.key("unknownCommands").beginArray();
  for (const auto& kv : st.unknownCommands) j.beginArray().str(kv.first).num(kv.second).endArray();
  j.endArray();
  j.key("unknownCommandCount").num(st.unknownCommandCount);
  j.key("checksumErrors").num(st.checksumErrors);
  j.key("longLines").num(st.longLines);
  j.key("warningsTotal").num(st.warningsTotal);
  j.key("speedFactor");
  writeOverride(j, st.speedFactor);
  j.key("flowFactor");
  writeOverride(j, st.flowFactor);
  j.key("nozzleTempMaxC").num(st.nozzleTempMaxC);
  j.key("bedTempMaxC").num(st.bedTempMaxC);
  j.key("fanMaxPercent").num(st.fanMaxPercent);
  j.key("toolsUsed").beginArray();
  for (double t : st.toolsUsed) j.num(t);
  j.endArray();
  j.key("firmwareRetractions").num(st.firmwareRetractions);
  j.key("featureLabels").num(st.featureLabels);
  j.key("textCommands").num(st.textCommands);
  j.endObject();
  j.key("warnings").beginArray();
  for (const auto& w : warnings_)
    j.beginObject().key("code").str(w.code).key("lineNo").num(w.lineNo).key("message").str(w.message).endObject();
  j.endArray();
  const MachineState& m = machine_;
  j.key("machine").beginObject();
  j.key("accelPrintMms2").num(m.accelPrintMms2);
  j.key("accelTravelMms2").num(m.accelTravelMms2);
  j.key("accelRetractMms2").num(m.accelRetractMms2);
  j.key("accelToDecelMms2").num(m.accelToDecelMms2);
  j.key("minimumCruiseRatio").num(m.minimumCruiseRatio);
  j.key("jerkXMms").num(m.jerkXMms);
  j.key("jerkYMms").num(m.jerkYMms);
  j.key("jerkZMms").num(m.jerkZMms);
  j.key("jerkEMms").num(m.jerkEMms);
  j.key("junctionDeviationMm").num(m.junctionDeviationMm);
  j.key("squareCornerVelocityMms").num(m.squareCornerVelocityMms);
  j.key("maxFeedXMms").num(m.maxFeedXMms);
  j.key("maxFeedYMms").num(m.maxFeedYMms);
  j.key("maxFeedZMms").num(m.maxFeedZMms);
  j.key("maxFeedEMms").num(m.maxFeedEMms);
  j.key("maxVelocityMms").num(m.maxVelocityMms);
  j.key("maxAccelXMms2").num(m.maxAccelXMms2);
  j.key("maxAccelYMms2").num(m.maxAccelYMms2);
  j.key("maxAccelZMms2").num(m.maxAccelZMms2);
  j.key("maxAccelEMms2").num(m.maxAccelEMms2);
  j.key("version").num(static_cast<double>(m.version));
  j.key("setBy").beginArray();
  for (const auto& s : m.setBy) j.str(s);
  j.endArray();
  j.key("lastMark").str(m.lastMark);
  j.endObject();
  j.endObject();
}

}  // namespace hotlap
