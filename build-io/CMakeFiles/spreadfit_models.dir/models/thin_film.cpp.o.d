CMakeFiles/spreadfit_models.dir/models/thin_film.cpp.o: \
 /work/main/models/thin_film.cpp /usr/include/stdc-predef.h \
 /work/main/models/thin_film.hpp /usr/include/c++/12/cstddef \
 /usr/include/x86_64-linux-gnu/c++/12/bits/c++config.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/os_defines.h \
 /usr/include/features.h /usr/include/features-time64.h \
 /usr/include/x86_64-linux-gnu/bits/wordsize.h \
 /usr/include/x86_64-linux-gnu/bits/timesize.h \
 /usr/include/x86_64-linux-gnu/sys/cdefs.h \
 /usr/include/x86_64-linux-gnu/bits/long-double.h \
 /usr/include/x86_64-linux-gnu/gnu/stubs.h \
 /usr/include/x86_64-linux-gnu/gnu/stubs-64.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/cpu_defines.h \
 /usr/include/c++/12/pstl/pstl_config.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/stddef.h \
 /usr/include/c++/12/string /usr/include/c++/12/bits/stringfwd.h \
 /usr/include/c++/12/bits/memoryfwd.h \
 /usr/include/c++/12/bits/char_traits.h \
 /usr/include/c++/12/bits/postypes.h /usr/include/c++/12/cwchar \
 /usr/include/wchar.h \
 /usr/include/x86_64-linux-gnu/bits/libc-header-start.h \
 /usr/include/x86_64-linux-gnu/bits/floatn.h \
 /usr/include/x86_64-linux-gnu/bits/floatn-common.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/stdarg.h \
 /usr/include/x86_64-linux-gnu/bits/wchar.h \
 /usr/include/x86_64-linux-gnu/bits/types/wint_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/mbstate_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__mbstate_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__FILE.h \
 /usr/include/x86_64-linux-gnu/bits/types/FILE.h \
 /usr/include/x86_64-linux-gnu/bits/types/locale_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__locale_t.h \
 /usr/include/c++/12/type_traits /usr/include/c++/12/compare \
 /usr/include/c++/12/concepts /usr/include/c++/12/bits/stl_construct.h \
 /usr/include/c++/12/new /usr/include/c++/12/bits/exception.h \
 /usr/include/c++/12/bits/move.h \
 /usr/include/c++/12/bits/stl_iterator_base_types.h \
 /usr/include/c++/12/bits/iterator_concepts.h \
 /usr/include/c++/12/bits/ptr_traits.h \
 /usr/include/c++/12/bits/ranges_cmp.h \
 /usr/include/c++/12/bits/stl_iterator_base_funcs.h \
 /usr/include/c++/12/bits/concept_check.h \
 /usr/include/c++/12/debug/assertions.h /usr/include/c++/12/cstdint \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/stdint.h /usr/include/stdint.h \
 /usr/include/x86_64-linux-gnu/bits/types.h \
 /usr/include/x86_64-linux-gnu/bits/typesizes.h \
 /usr/include/x86_64-linux-gnu/bits/time64.h \
 /usr/include/x86_64-linux-gnu/bits/stdint-intn.h \
 /usr/include/x86_64-linux-gnu/bits/stdint-uintn.h \
 /usr/include/c++/12/bits/allocator.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/c++allocator.h \
 /usr/include/c++/12/bits/new_allocator.h \
 /usr/include/c++/12/bits/functexcept.h \
 /usr/include/c++/12/bits/exception_defines.h \
 /usr/include/c++/12/bits/cpp_type_traits.h \
 /usr/include/c++/12/bits/localefwd.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/c++locale.h \
 /usr/include/c++/12/clocale /usr/include/locale.h \
 /usr/include/x86_64-linux-gnu/bits/locale.h /usr/include/c++/12/iosfwd \
 /usr/include/c++/12/cctype /usr/include/ctype.h \
 /usr/include/x86_64-linux-gnu/bits/endian.h \
 /usr/include/x86_64-linux-gnu/bits/endianness.h \
 /usr/include/c++/12/bits/ostream_insert.h \
 /usr/include/c++/12/bits/cxxabi_forced.h \
 /usr/include/c++/12/bits/stl_iterator.h \
 /usr/include/c++/12/ext/type_traits.h \
 /usr/include/c++/12/bits/stl_function.h \
 /usr/include/c++/12/backward/binders.h \
 /usr/include/c++/12/ext/numeric_traits.h \
 /usr/include/c++/12/bits/stl_algobase.h \
 /usr/include/c++/12/bits/stl_pair.h /usr/include/c++/12/bits/utility.h \
 /usr/include/c++/12/debug/debug.h \
 /usr/include/c++/12/bits/predefined_ops.h \
 /usr/include/c++/12/bits/refwrap.h /usr/include/c++/12/bits/invoke.h \
 /usr/include/c++/12/bits/range_access.h \
 /usr/include/c++/12/initializer_list \
 /usr/include/c++/12/bits/basic_string.h \
 /usr/include/c++/12/ext/alloc_traits.h \
 /usr/include/c++/12/bits/alloc_traits.h /usr/include/c++/12/string_view \
 /usr/include/c++/12/bits/functional_hash.h \
 /usr/include/c++/12/bits/hash_bytes.h \
 /usr/include/c++/12/bits/ranges_base.h \
 /usr/include/c++/12/bits/max_size_type.h /usr/include/c++/12/numbers \
 /usr/include/c++/12/bits/string_view.tcc \
 /usr/include/c++/12/ext/string_conversions.h /usr/include/c++/12/cstdlib \
 /usr/include/stdlib.h /usr/include/x86_64-linux-gnu/bits/waitflags.h \
 /usr/include/x86_64-linux-gnu/bits/waitstatus.h \
 /usr/include/x86_64-linux-gnu/sys/types.h \
 /usr/include/x86_64-linux-gnu/bits/types/clock_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/clockid_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/time_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/timer_t.h /usr/include/endian.h \
 /usr/include/x86_64-linux-gnu/bits/byteswap.h \
 /usr/include/x86_64-linux-gnu/bits/uintn-identity.h \
 /usr/include/x86_64-linux-gnu/sys/select.h \
 /usr/include/x86_64-linux-gnu/bits/select.h \
 /usr/include/x86_64-linux-gnu/bits/types/sigset_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__sigset_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_timeval.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_timespec.h \
 /usr/include/x86_64-linux-gnu/bits/pthreadtypes.h \
 /usr/include/x86_64-linux-gnu/bits/thread-shared-types.h \
 /usr/include/x86_64-linux-gnu/bits/pthreadtypes-arch.h \
 /usr/include/x86_64-linux-gnu/bits/atomic_wide_counter.h \
 /usr/include/x86_64-linux-gnu/bits/struct_mutex.h \
 /usr/include/x86_64-linux-gnu/bits/struct_rwlock.h /usr/include/alloca.h \
 /usr/include/x86_64-linux-gnu/bits/stdlib-bsearch.h \
 /usr/include/x86_64-linux-gnu/bits/stdlib-float.h \
 /usr/include/c++/12/bits/std_abs.h /usr/include/c++/12/cstdio \
 /usr/include/stdio.h /usr/include/x86_64-linux-gnu/bits/types/__fpos_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/__fpos64_t.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_FILE.h \
 /usr/include/x86_64-linux-gnu/bits/types/cookie_io_functions_t.h \
 /usr/include/x86_64-linux-gnu/bits/stdio_lim.h \
 /usr/include/x86_64-linux-gnu/bits/stdio.h /usr/include/c++/12/cerrno \
 /usr/include/errno.h /usr/include/x86_64-linux-gnu/bits/errno.h \
 /usr/include/linux/errno.h /usr/include/x86_64-linux-gnu/asm/errno.h \
 /usr/include/asm-generic/errno.h /usr/include/asm-generic/errno-base.h \
 /usr/include/x86_64-linux-gnu/bits/types/error_t.h \
 /usr/include/c++/12/bits/charconv.h \
 /usr/include/c++/12/bits/basic_string.tcc /usr/include/c++/12/vector \
 /usr/include/c++/12/bits/stl_uninitialized.h \
 /usr/include/c++/12/bits/stl_vector.h \
 /usr/include/c++/12/bits/stl_bvector.h \
 /usr/include/c++/12/bits/vector.tcc /usr/include/eigen3/Eigen/Core \
 /usr/include/eigen3/Eigen/src/Core/util/DisableStupidWarnings.h \
 /usr/include/eigen3/Eigen/src/Core/util/Macros.h \
 /usr/include/c++/12/cmath /usr/include/math.h \
 /usr/include/x86_64-linux-gnu/bits/math-vector.h \
 /usr/include/x86_64-linux-gnu/bits/libm-simd-decl-stubs.h \
 /usr/include/x86_64-linux-gnu/bits/flt-eval-method.h \
 /usr/include/x86_64-linux-gnu/bits/fp-logb.h \
 /usr/include/x86_64-linux-gnu/bits/fp-fast.h \
 /usr/include/x86_64-linux-gnu/bits/mathcalls-helper-functions.h \
 /usr/include/x86_64-linux-gnu/bits/mathcalls.h \
 /usr/include/x86_64-linux-gnu/bits/mathcalls-narrow.h \
 /usr/include/x86_64-linux-gnu/bits/iscanonical.h \
 /usr/include/c++/12/bits/specfun.h /usr/include/c++/12/limits \
 /usr/include/c++/12/tr1/gamma.tcc \
 /usr/include/c++/12/tr1/special_function_util.h \
 /usr/include/c++/12/tr1/bessel_function.tcc \
 /usr/include/c++/12/tr1/beta_function.tcc \
 /usr/include/c++/12/tr1/ell_integral.tcc \
 /usr/include/c++/12/tr1/exp_integral.tcc \
 /usr/include/c++/12/tr1/hypergeometric.tcc \
 /usr/include/c++/12/tr1/legendre_function.tcc \
 /usr/include/c++/12/tr1/modified_bessel_func.tcc \
 /usr/include/c++/12/tr1/poly_hermite.tcc \
 /usr/include/c++/12/tr1/poly_laguerre.tcc \
 /usr/include/c++/12/tr1/riemann_zeta.tcc \
 /usr/include/eigen3/Eigen/src/Core/util/ConfigureVectorization.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/mmintrin.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/emmintrin.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/xmmintrin.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/mm_malloc.h \
 /usr/include/c++/12/stdlib.h /usr/include/c++/12/complex \
 /usr/include/c++/12/sstream /usr/include/c++/12/istream \
 /usr/include/c++/12/ios /usr/include/c++/12/exception \
 /usr/include/c++/12/bits/exception_ptr.h \
 /usr/include/c++/12/bits/cxxabi_init_exception.h \
 /usr/include/c++/12/typeinfo /usr/include/c++/12/bits/nested_exception.h \
 /usr/include/c++/12/bits/ios_base.h /usr/include/c++/12/ext/atomicity.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/gthr.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/gthr-default.h \
 /usr/include/pthread.h /usr/include/sched.h \
 /usr/include/x86_64-linux-gnu/bits/sched.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_sched_param.h \
 /usr/include/x86_64-linux-gnu/bits/cpu-set.h /usr/include/time.h \
 /usr/include/x86_64-linux-gnu/bits/time.h \
 /usr/include/x86_64-linux-gnu/bits/timex.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_tm.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct_itimerspec.h \
 /usr/include/x86_64-linux-gnu/bits/setjmp.h \
 /usr/include/x86_64-linux-gnu/bits/types/struct___jmp_buf_tag.h \
 /usr/include/x86_64-linux-gnu/bits/pthread_stack_min-dynamic.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/atomic_word.h \
 /usr/include/x86_64-linux-gnu/sys/single_threaded.h \
 /usr/include/c++/12/bits/locale_classes.h \
 /usr/include/c++/12/bits/locale_classes.tcc \
 /usr/include/c++/12/system_error \
 /usr/include/x86_64-linux-gnu/c++/12/bits/error_constants.h \
 /usr/include/c++/12/stdexcept /usr/include/c++/12/streambuf \
 /usr/include/c++/12/bits/streambuf.tcc \
 /usr/include/c++/12/bits/basic_ios.h \
 /usr/include/c++/12/bits/locale_facets.h /usr/include/c++/12/cwctype \
 /usr/include/wctype.h /usr/include/x86_64-linux-gnu/bits/wctype-wchar.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/ctype_base.h \
 /usr/include/c++/12/bits/streambuf_iterator.h \
 /usr/include/x86_64-linux-gnu/c++/12/bits/ctype_inline.h \
 /usr/include/c++/12/bits/locale_facets.tcc \
 /usr/include/c++/12/bits/basic_ios.tcc /usr/include/c++/12/ostream \
 /usr/include/c++/12/bits/ostream.tcc \
 /usr/include/c++/12/bits/istream.tcc \
 /usr/include/c++/12/bits/sstream.tcc \
 /usr/include/eigen3/Eigen/src/Core/util/MKL_support.h \
 /usr/include/c++/12/cassert /usr/include/assert.h \
 /usr/include/c++/12/functional /usr/include/c++/12/tuple \
 /usr/include/c++/12/bits/uses_allocator.h \
 /usr/include/c++/12/bits/std_function.h \
 /usr/include/c++/12/unordered_map \
 /usr/include/c++/12/ext/aligned_buffer.h \
 /usr/include/c++/12/bits/hashtable.h \
 /usr/include/c++/12/bits/hashtable_policy.h \
 /usr/include/c++/12/bits/enable_special_members.h \
 /usr/include/c++/12/bits/node_handle.h \
 /usr/include/c++/12/bits/unordered_map.h \
 /usr/include/c++/12/bits/erase_if.h /usr/include/c++/12/array \
 /usr/include/c++/12/bits/stl_algo.h \
 /usr/include/c++/12/bits/algorithmfwd.h \
 /usr/include/c++/12/bits/stl_heap.h \
 /usr/include/c++/12/bits/stl_tempbuf.h \
 /usr/include/c++/12/bits/uniform_int_dist.h /usr/include/c++/12/cstring \
 /usr/include/string.h /usr/include/strings.h /usr/include/c++/12/climits \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/limits.h \
 /usr/lib/gcc/x86_64-linux-gnu/12/include/syslimits.h \
 /usr/include/limits.h /usr/include/x86_64-linux-gnu/bits/posix1_lim.h \
 /usr/include/x86_64-linux-gnu/bits/local_lim.h \
 /usr/include/linux/limits.h \
 /usr/include/x86_64-linux-gnu/bits/posix2_lim.h \
 /usr/include/x86_64-linux-gnu/bits/xopen_lim.h \
 /usr/include/x86_64-linux-gnu/bits/uio_lim.h \
 /usr/include/c++/12/algorithm /usr/include/c++/12/bits/ranges_algo.h \
 /usr/include/c++/12/bits/ranges_algobase.h \
 /usr/include/c++/12/bits/ranges_util.h \
 /usr/include/c++/12/pstl/glue_algorithm_defs.h \
 /usr/include/c++/12/pstl/execution_defs.h \
 /usr/include/eigen3/Eigen/src/Core/util/Constants.h \
 /usr/include/eigen3/Eigen/src/Core/util/Meta.h \
 /usr/include/eigen3/Eigen/src/Core/util/ForwardDeclarations.h \
 /usr/include/eigen3/Eigen/src/Core/util/StaticAssert.h \
 /usr/include/eigen3/Eigen/src/Core/util/XprHelper.h \
 /usr/include/eigen3/Eigen/src/Core/util/Memory.h \
 /usr/include/eigen3/Eigen/src/Core/util/IntegralConstant.h \
 /usr/include/eigen3/Eigen/src/Core/util/SymbolicIndex.h \
 /usr/include/eigen3/Eigen/src/Core/NumTraits.h \
 /usr/include/eigen3/Eigen/src/Core/MathFunctions.h \
 /usr/include/eigen3/Eigen/src/Core/GenericPacketMath.h \
 /usr/include/eigen3/Eigen/src/Core/MathFunctionsImpl.h \
 /usr/include/eigen3/Eigen/src/Core/arch/Default/ConjHelper.h \
 /usr/include/eigen3/Eigen/src/Core/arch/Default/Half.h \
 /usr/include/eigen3/Eigen/src/Core/arch/Default/BFloat16.h \
 /usr/include/eigen3/Eigen/src/Core/arch/Default/TypeCasting.h \
 /usr/include/eigen3/Eigen/src/Core/arch/Default/GenericPacketMathFunctionsFwd.h \
 /usr/include/eigen3/Eigen/src/Core/arch/SSE/PacketMath.h \
 /usr/include/eigen3/Eigen/src/Core/arch/SSE/TypeCasting.h \
 /usr/include/eigen3/Eigen/src/Core/arch/SSE/MathFunctions.h \
 /usr/include/eigen3/Eigen/src/Core/arch/SSE/Complex.h \
 /usr/include/eigen3/Eigen/src/Core/arch/Default/Settings.h \
 /usr/include/eigen3/Eigen/src/Core/arch/Default/GenericPacketMathFunctions.h \
 /usr/include/eigen3/Eigen/src/Core/functors/TernaryFunctors.h \
 /usr/include/eigen3/Eigen/src/Core/functors/BinaryFunctors.h \
 /usr/include/eigen3/Eigen/src/Core/functors/UnaryFunctors.h \
 /usr/include/eigen3/Eigen/src/Core/functors/NullaryFunctors.h \
 /usr/include/eigen3/Eigen/src/Core/functors/StlFunctors.h \
 /usr/include/eigen3/Eigen/src/Core/functors/AssignmentFunctors.h \
 /usr/include/eigen3/Eigen/src/Core/util/IndexedViewHelper.h \
 /usr/include/eigen3/Eigen/src/Core/util/ReshapedHelper.h \
 /usr/include/eigen3/Eigen/src/Core/ArithmeticSequence.h \
 /usr/include/eigen3/Eigen/src/Core/IO.h \
 /usr/include/eigen3/Eigen/src/Core/DenseCoeffsBase.h \
 /usr/include/eigen3/Eigen/src/Core/DenseBase.h \
 /usr/include/eigen3/Eigen/src/plugins/CommonCwiseUnaryOps.h \
 /usr/include/eigen3/Eigen/src/plugins/BlockMethods.h \
 /usr/include/eigen3/Eigen/src/plugins/IndexedViewMethods.h \
 /usr/include/eigen3/Eigen/src/plugins/IndexedViewMethods.h \
 /usr/include/eigen3/Eigen/src/plugins/ReshapedMethods.h \
 /usr/include/eigen3/Eigen/src/plugins/ReshapedMethods.h \
 /usr/include/eigen3/Eigen/src/Core/MatrixBase.h \
 /usr/include/eigen3/Eigen/src/plugins/CommonCwiseBinaryOps.h \
 /usr/include/eigen3/Eigen/src/plugins/MatrixCwiseUnaryOps.h \
 /usr/include/eigen3/Eigen/src/plugins/MatrixCwiseBinaryOps.h \
 /usr/include/eigen3/Eigen/src/Core/EigenBase.h \
 /usr/include/eigen3/Eigen/src/Core/Product.h \
 /usr/include/eigen3/Eigen/src/Core/CoreEvaluators.h \
 /usr/include/eigen3/Eigen/src/Core/AssignEvaluator.h \
 /usr/include/eigen3/Eigen/src/Core/Assign.h \
 /usr/include/eigen3/Eigen/src/Core/ArrayBase.h \
 /usr/include/eigen3/Eigen/src/plugins/ArrayCwiseUnaryOps.h \
 /usr/include/eigen3/Eigen/src/plugins/ArrayCwiseBinaryOps.h \
 /usr/include/eigen3/Eigen/src/Core/util/BlasUtil.h \
 /usr/include/eigen3/Eigen/src/Core/DenseStorage.h \
 /usr/include/eigen3/Eigen/src/Core/NestByValue.h \
 /usr/include/eigen3/Eigen/src/Core/ReturnByValue.h \
 /usr/include/eigen3/Eigen/src/Core/NoAlias.h \
 /usr/include/eigen3/Eigen/src/Core/PlainObjectBase.h \
 /usr/include/eigen3/Eigen/src/Core/Matrix.h \
 /usr/include/eigen3/Eigen/src/Core/Array.h \
 /usr/include/eigen3/Eigen/src/Core/CwiseTernaryOp.h \
 /usr/include/eigen3/Eigen/src/Core/CwiseBinaryOp.h \
 /usr/include/eigen3/Eigen/src/Core/CwiseUnaryOp.h \
 /usr/include/eigen3/Eigen/src/Core/CwiseNullaryOp.h \
 /usr/include/eigen3/Eigen/src/Core/CwiseUnaryView.h \
 /usr/include/eigen3/Eigen/src/Core/SelfCwiseBinaryOp.h \
 /usr/include/eigen3/Eigen/src/Core/Dot.h \
 /usr/include/eigen3/Eigen/src/Core/StableNorm.h \
 /usr/include/eigen3/Eigen/src/Core/Stride.h \
 /usr/include/eigen3/Eigen/src/Core/MapBase.h \
 /usr/include/eigen3/Eigen/src/Core/Map.h \
 /usr/include/eigen3/Eigen/src/Core/Ref.h \
 /usr/include/eigen3/Eigen/src/Core/Block.h \
 /usr/include/eigen3/Eigen/src/Core/VectorBlock.h \
 /usr/include/eigen3/Eigen/src/Core/IndexedView.h \
 /usr/include/eigen3/Eigen/src/Core/Reshaped.h \
 /usr/include/eigen3/Eigen/src/Core/Transpose.h \
 /usr/include/eigen3/Eigen/src/Core/DiagonalMatrix.h \
 /usr/include/eigen3/Eigen/src/Core/Diagonal.h \
 /usr/include/eigen3/Eigen/src/Core/DiagonalProduct.h \
 /usr/include/eigen3/Eigen/src/Core/Redux.h \
 /usr/include/eigen3/Eigen/src/Core/Visitor.h \
 /usr/include/eigen3/Eigen/src/Core/Fuzzy.h \
 /usr/include/eigen3/Eigen/src/Core/Swap.h \
 /usr/include/eigen3/Eigen/src/Core/CommaInitializer.h \
 /usr/include/eigen3/Eigen/src/Core/GeneralProduct.h \
 /usr/include/eigen3/Eigen/src/Core/Solve.h \
 /usr/include/eigen3/Eigen/src/Core/Inverse.h \
 /usr/include/eigen3/Eigen/src/Core/SolverBase.h \
 /usr/include/eigen3/Eigen/src/Core/PermutationMatrix.h \
 /usr/include/eigen3/Eigen/src/Core/Transpositions.h \
 /usr/include/eigen3/Eigen/src/Core/TriangularMatrix.h \
 /usr/include/eigen3/Eigen/src/Core/SelfAdjointView.h \
 /usr/include/eigen3/Eigen/src/Core/products/GeneralBlockPanelKernel.h \
 /usr/include/eigen3/Eigen/src/Core/products/Parallelizer.h \
 /usr/include/c++/12/atomic /usr/include/c++/12/bits/atomic_base.h \
 /usr/include/c++/12/bits/atomic_lockfree_defines.h \
 /usr/include/c++/12/bits/atomic_wait.h /usr/include/unistd.h \
 /usr/include/x86_64-linux-gnu/bits/posix_opt.h \
 /usr/include/x86_64-linux-gnu/bits/environments.h \
 /usr/include/x86_64-linux-gnu/bits/confname.h \
 /usr/include/x86_64-linux-gnu/bits/getopt_posix.h \
 /usr/include/x86_64-linux-gnu/bits/getopt_core.h \
 /usr/include/x86_64-linux-gnu/bits/unistd_ext.h \
 /usr/include/linux/close_range.h /usr/include/syscall.h \
 /usr/include/x86_64-linux-gnu/sys/syscall.h \
 /usr/include/x86_64-linux-gnu/asm/unistd.h \
 /usr/include/x86_64-linux-gnu/asm/unistd_64.h \
 /usr/include/x86_64-linux-gnu/bits/syscall.h \
 /usr/include/c++/12/bits/std_mutex.h \
 /usr/include/eigen3/Eigen/src/Core/ProductEvaluators.h \
 /usr/include/eigen3/Eigen/src/Core/products/GeneralMatrixVector.h \
 /usr/include/eigen3/Eigen/src/Core/products/GeneralMatrixMatrix.h \
 /usr/include/eigen3/Eigen/src/Core/SolveTriangular.h \
 /usr/include/eigen3/Eigen/src/Core/products/GeneralMatrixMatrixTriangular.h \
 /usr/include/eigen3/Eigen/src/Core/products/SelfadjointMatrixVector.h \
 /usr/include/eigen3/Eigen/src/Core/products/SelfadjointMatrixMatrix.h \
 /usr/include/eigen3/Eigen/src/Core/products/SelfadjointProduct.h \
 /usr/include/eigen3/Eigen/src/Core/products/SelfadjointRank2Update.h \
 /usr/include/eigen3/Eigen/src/Core/products/TriangularMatrixVector.h \
 /usr/include/eigen3/Eigen/src/Core/products/TriangularMatrixMatrix.h \
 /usr/include/eigen3/Eigen/src/Core/products/TriangularSolverMatrix.h \
 /usr/include/eigen3/Eigen/src/Core/products/TriangularSolverVector.h \
 /usr/include/eigen3/Eigen/src/Core/BandMatrix.h \
 /usr/include/eigen3/Eigen/src/Core/CoreIterators.h \
 /usr/include/eigen3/Eigen/src/Core/ConditionEstimator.h \
 /usr/include/eigen3/Eigen/src/Core/BooleanRedux.h \
 /usr/include/eigen3/Eigen/src/Core/Select.h \
 /usr/include/eigen3/Eigen/src/Core/VectorwiseOp.h \
 /usr/include/eigen3/Eigen/src/Core/PartialReduxEvaluator.h \
 /usr/include/eigen3/Eigen/src/Core/Random.h \
 /usr/include/eigen3/Eigen/src/Core/Replicate.h \
 /usr/include/eigen3/Eigen/src/Core/Reverse.h \
 /usr/include/eigen3/Eigen/src/Core/ArrayWrapper.h \
 /usr/include/eigen3/Eigen/src/Core/StlIterators.h \
 /usr/include/eigen3/Eigen/src/Core/GlobalFunctions.h \
 /usr/include/eigen3/Eigen/src/Core/util/ReenableStupidWarnings.h \
 /work/main/models/rheology.hpp /usr/include/c++/12/optional \
 /usr/include/boost/numeric/odeint/integrate/integrate_times.hpp \
 /usr/include/boost/type_traits/is_same.hpp \
 /usr/include/boost/type_traits/integral_constant.hpp \
 /usr/include/boost/config.hpp /usr/include/boost/config/user.hpp \
 /usr/include/boost/config/detail/select_compiler_config.hpp \
 /usr/include/boost/config/compiler/gcc.hpp \
 /usr/include/boost/config/detail/select_stdlib_config.hpp \
 /usr/include/c++/12/version \
 /usr/include/boost/config/stdlib/libstdcpp3.hpp \
 /usr/include/boost/config/detail/select_platform_config.hpp \
 /usr/include/boost/config/platform/linux.hpp \
 /usr/include/boost/config/detail/posix_features.hpp \
 /usr/include/boost/config/detail/suffix.hpp \
 /usr/include/boost/config/helper_macros.hpp \
 /usr/include/boost/detail/workaround.hpp \
 /usr/include/boost/config/workaround.hpp /usr/include/boost/range.hpp \
 /usr/include/boost/range/functions.hpp \
 /usr/include/boost/range/begin.hpp /usr/include/boost/range/config.hpp \
 /usr/include/boost/range/iterator.hpp \
 /usr/include/boost/range/range_fwd.hpp \
 /usr/include/boost/range/mutable_iterator.hpp \
 /usr/include/boost/range/detail/extract_optional_type.hpp \
 /usr/include/boost/preprocessor/cat.hpp \
 /usr/include/boost/preprocessor/config/config.hpp \
 /usr/include/boost/mpl/has_xxx.hpp /usr/include/boost/mpl/bool.hpp \
 /usr/include/boost/mpl/bool_fwd.hpp \
 /usr/include/boost/mpl/aux_/adl_barrier.hpp \
 /usr/include/boost/mpl/aux_/config/adl.hpp \
 /usr/include/boost/mpl/aux_/config/msvc.hpp \
 /usr/include/boost/mpl/aux_/config/intel.hpp \
 /usr/include/boost/mpl/aux_/config/gcc.hpp \
 /usr/include/boost/mpl/aux_/config/workaround.hpp \
 /usr/include/boost/mpl/integral_c_tag.hpp \
 /usr/include/boost/mpl/aux_/config/static_constant.hpp \
 /usr/include/boost/mpl/aux_/na_spec.hpp \
 /usr/include/boost/mpl/lambda_fwd.hpp \
 /usr/include/boost/mpl/void_fwd.hpp /usr/include/boost/mpl/aux_/na.hpp \
 /usr/include/boost/mpl/aux_/na_fwd.hpp \
 /usr/include/boost/mpl/aux_/config/ctps.hpp \
 /usr/include/boost/mpl/aux_/config/lambda.hpp \
 /usr/include/boost/mpl/aux_/config/ttp.hpp \
 /usr/include/boost/mpl/int.hpp /usr/include/boost/mpl/int_fwd.hpp \
 /usr/include/boost/mpl/aux_/nttp_decl.hpp \
 /usr/include/boost/mpl/aux_/config/nttp.hpp \
 /usr/include/boost/mpl/aux_/integral_wrapper.hpp \
 /usr/include/boost/mpl/aux_/static_cast.hpp \
 /usr/include/boost/mpl/aux_/lambda_arity_param.hpp \
 /usr/include/boost/mpl/aux_/template_arity_fwd.hpp \
 /usr/include/boost/mpl/aux_/arity.hpp \
 /usr/include/boost/mpl/aux_/config/dtp.hpp \
 /usr/include/boost/mpl/aux_/preprocessor/params.hpp \
 /usr/include/boost/mpl/aux_/config/preprocessor.hpp \
 /usr/include/boost/preprocessor/comma_if.hpp \
 /usr/include/boost/preprocessor/punctuation/comma_if.hpp \
 /usr/include/boost/preprocessor/control/if.hpp \
 /usr/include/boost/preprocessor/control/iif.hpp \
 /usr/include/boost/preprocessor/logical/bool.hpp \
 /usr/include/boost/preprocessor/facilities/empty.hpp \
 /usr/include/boost/preprocessor/punctuation/comma.hpp \
 /usr/include/boost/preprocessor/repeat.hpp \
 /usr/include/boost/preprocessor/repetition/repeat.hpp \
 /usr/include/boost/preprocessor/debug/error.hpp \
 /usr/include/boost/preprocessor/detail/auto_rec.hpp \
 /usr/include/boost/preprocessor/tuple/eat.hpp \
 /usr/include/boost/preprocessor/inc.hpp \
 /usr/include/boost/preprocessor/arithmetic/inc.hpp \
 /usr/include/boost/mpl/aux_/preprocessor/enum.hpp \
 /usr/include/boost/mpl/aux_/preprocessor/def_params_tail.hpp \
 /usr/include/boost/mpl/limits/arity.hpp \
 /usr/include/boost/preprocessor/logical/and.hpp \
 /usr/include/boost/preprocessor/logical/bitand.hpp \
 /usr/include/boost/preprocessor/identity.hpp \
 /usr/include/boost/preprocessor/facilities/identity.hpp \
 /usr/include/boost/preprocessor/empty.hpp \
 /usr/include/boost/preprocessor/arithmetic/add.hpp \
 /usr/include/boost/preprocessor/arithmetic/dec.hpp \
 /usr/include/boost/preprocessor/control/while.hpp \
 /usr/include/boost/preprocessor/list/fold_left.hpp \
 /usr/include/boost/preprocessor/list/detail/fold_left.hpp \
 /usr/include/boost/preprocessor/control/expr_iif.hpp \
 /usr/include/boost/preprocessor/list/adt.hpp \
 /usr/include/boost/preprocessor/detail/is_binary.hpp \
 /usr/include/boost/preprocessor/detail/check.hpp \
 /usr/include/boost/preprocessor/logical/compl.hpp \
 /usr/include/boost/preprocessor/list/fold_right.hpp \
 /usr/include/boost/preprocessor/list/detail/fold_right.hpp \
 /usr/include/boost/preprocessor/list/reverse.hpp \
 /usr/include/boost/preprocessor/control/detail/while.hpp \
 /usr/include/boost/preprocessor/tuple/elem.hpp \
 /usr/include/boost/preprocessor/facilities/expand.hpp \
 /usr/include/boost/preprocessor/facilities/overload.hpp \
 /usr/include/boost/preprocessor/variadic/size.hpp \
 /usr/include/boost/preprocessor/tuple/rem.hpp \
 /usr/include/boost/preprocessor/tuple/detail/is_single_return.hpp \
 /usr/include/boost/preprocessor/variadic/elem.hpp \
 /usr/include/boost/preprocessor/arithmetic/sub.hpp \
 /usr/include/boost/mpl/aux_/config/eti.hpp \
 /usr/include/boost/mpl/aux_/config/overload_resolution.hpp \
 /usr/include/boost/mpl/aux_/type_wrapper.hpp \
 /usr/include/boost/mpl/aux_/yes_no.hpp \
 /usr/include/boost/mpl/aux_/config/arrays.hpp \
 /usr/include/boost/mpl/aux_/config/has_xxx.hpp \
 /usr/include/boost/mpl/aux_/config/msvc_typename.hpp \
 /usr/include/boost/preprocessor/array/elem.hpp \
 /usr/include/boost/preprocessor/array/data.hpp \
 /usr/include/boost/preprocessor/array/size.hpp \
 /usr/include/boost/preprocessor/repetition/enum_params.hpp \
 /usr/include/boost/preprocessor/repetition/enum_trailing_params.hpp \
 /usr/include/boost/type_traits/remove_reference.hpp \
 /usr/include/boost/iterator/iterator_traits.hpp \
 /usr/include/c++/12/iterator /usr/include/c++/12/bits/stream_iterator.h \
 /usr/include/c++/12/utility /usr/include/c++/12/bits/stl_relops.h \
 /usr/include/boost/range/detail/msvc_has_iterator_workaround.hpp \
 /usr/include/boost/range/const_iterator.hpp \
 /usr/include/boost/type_traits/remove_const.hpp \
 /usr/include/boost/type_traits/is_const.hpp \
 /usr/include/boost/mpl/eval_if.hpp /usr/include/boost/mpl/if.hpp \
 /usr/include/boost/mpl/aux_/value_wknd.hpp \
 /usr/include/boost/mpl/aux_/config/integral.hpp \
 /usr/include/boost/mpl/aux_/lambda_support.hpp \
 /usr/include/boost/range/end.hpp \
 /usr/include/boost/range/detail/implementation_help.hpp \
 /usr/include/boost/range/detail/common.hpp \
 /usr/include/boost/range/detail/sfinae.hpp \
 /usr/include/boost/type_traits/is_array.hpp \
 /usr/include/boost/type_traits/detail/yes_no_type.hpp \
 /usr/include/boost/type_traits/is_void.hpp \
 /usr/include/boost/range/size.hpp /usr/include/boost/range/size_type.hpp \
 /usr/include/boost/range/difference_type.hpp \
 /usr/include/boost/mpl/and.hpp \
 /usr/include/boost/mpl/aux_/config/use_preprocessed.hpp \
 /usr/include/boost/mpl/aux_/nested_type_wknd.hpp \
 /usr/include/boost/mpl/aux_/include_preprocessed.hpp \
 /usr/include/boost/mpl/aux_/config/compiler.hpp \
 /usr/include/boost/preprocessor/stringize.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/and.hpp \
 /usr/include/boost/range/has_range_iterator.hpp \
 /usr/include/boost/utility/enable_if.hpp \
 /usr/include/boost/core/enable_if.hpp \
 /usr/include/boost/range/concepts.hpp \
 /usr/include/boost/concept_check.hpp \
 /usr/include/boost/concept/assert.hpp \
 /usr/include/boost/concept/detail/general.hpp \
 /usr/include/boost/concept/detail/backward_compatibility.hpp \
 /usr/include/boost/concept/detail/has_constraints.hpp \
 /usr/include/boost/type_traits/conditional.hpp \
 /usr/include/boost/type_traits/conversion_traits.hpp \
 /usr/include/boost/type_traits/is_convertible.hpp \
 /usr/include/boost/type_traits/intrinsics.hpp \
 /usr/include/boost/type_traits/detail/config.hpp \
 /usr/include/boost/version.hpp \
 /usr/include/boost/type_traits/is_complete.hpp \
 /usr/include/boost/type_traits/declval.hpp \
 /usr/include/boost/type_traits/add_rvalue_reference.hpp \
 /usr/include/boost/type_traits/is_reference.hpp \
 /usr/include/boost/type_traits/is_lvalue_reference.hpp \
 /usr/include/boost/type_traits/is_rvalue_reference.hpp \
 /usr/include/boost/type_traits/is_function.hpp \
 /usr/include/boost/type_traits/detail/is_function_cxx_11.hpp \
 /usr/include/boost/static_assert.hpp \
 /usr/include/boost/type_traits/is_arithmetic.hpp \
 /usr/include/boost/type_traits/is_integral.hpp \
 /usr/include/boost/type_traits/is_floating_point.hpp \
 /usr/include/boost/type_traits/is_abstract.hpp \
 /usr/include/boost/type_traits/add_lvalue_reference.hpp \
 /usr/include/boost/type_traits/add_reference.hpp \
 /usr/include/boost/concept/usage.hpp \
 /usr/include/boost/concept/detail/concept_def.hpp \
 /usr/include/boost/preprocessor/seq/for_each_i.hpp \
 /usr/include/boost/preprocessor/repetition/for.hpp \
 /usr/include/boost/preprocessor/repetition/detail/for.hpp \
 /usr/include/boost/preprocessor/seq/seq.hpp \
 /usr/include/boost/preprocessor/seq/elem.hpp \
 /usr/include/boost/preprocessor/seq/size.hpp \
 /usr/include/boost/preprocessor/seq/detail/is_empty.hpp \
 /usr/include/boost/preprocessor/seq/enum.hpp \
 /usr/include/boost/concept/detail/concept_undef.hpp \
 /usr/include/boost/iterator/iterator_concepts.hpp \
 /usr/include/boost/iterator/iterator_categories.hpp \
 /usr/include/boost/iterator/detail/config_def.hpp \
 /usr/include/boost/mpl/identity.hpp \
 /usr/include/boost/mpl/placeholders.hpp /usr/include/boost/mpl/arg.hpp \
 /usr/include/boost/mpl/arg_fwd.hpp \
 /usr/include/boost/mpl/aux_/na_assert.hpp \
 /usr/include/boost/mpl/assert.hpp /usr/include/boost/mpl/not.hpp \
 /usr/include/boost/mpl/aux_/config/gpu.hpp \
 /usr/include/boost/mpl/aux_/config/pp_counter.hpp \
 /usr/include/boost/mpl/aux_/arity_spec.hpp \
 /usr/include/boost/mpl/aux_/arg_typedef.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/arg.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/placeholders.hpp \
 /usr/include/boost/iterator/detail/config_undef.hpp \
 /usr/include/boost/mpl/or.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/or.hpp \
 /usr/include/boost/limits.hpp /usr/include/boost/range/value_type.hpp \
 /usr/include/boost/range/detail/misc_concept.hpp \
 /usr/include/boost/type_traits/make_unsigned.hpp \
 /usr/include/boost/type_traits/is_signed.hpp \
 /usr/include/boost/type_traits/remove_cv.hpp \
 /usr/include/boost/type_traits/is_enum.hpp \
 /usr/include/boost/type_traits/is_unsigned.hpp \
 /usr/include/boost/type_traits/is_volatile.hpp \
 /usr/include/boost/type_traits/add_const.hpp \
 /usr/include/boost/type_traits/add_volatile.hpp \
 /usr/include/boost/range/detail/has_member_size.hpp \
 /usr/include/boost/type_traits/is_class.hpp \
 /usr/include/boost/type_traits/is_member_function_pointer.hpp \
 /usr/include/boost/type_traits/detail/is_member_function_pointer_cxx_11.hpp \
 /usr/include/boost/cstdint.hpp /usr/include/boost/assert.hpp \
 /usr/include/boost/utility.hpp \
 /usr/include/boost/utility/base_from_member.hpp \
 /usr/include/boost/preprocessor/repetition/enum_binary_params.hpp \
 /usr/include/boost/preprocessor/repetition/repeat_from_to.hpp \
 /usr/include/boost/utility/binary.hpp \
 /usr/include/boost/preprocessor/control/deduce_d.hpp \
 /usr/include/boost/preprocessor/seq/cat.hpp \
 /usr/include/boost/preprocessor/seq/fold_left.hpp \
 /usr/include/boost/preprocessor/seq/transform.hpp \
 /usr/include/boost/preprocessor/arithmetic/mod.hpp \
 /usr/include/boost/preprocessor/arithmetic/detail/div_base.hpp \
 /usr/include/boost/preprocessor/comparison/less_equal.hpp \
 /usr/include/boost/preprocessor/logical/not.hpp \
 /usr/include/boost/utility/identity_type.hpp \
 /usr/include/boost/type_traits/function_traits.hpp \
 /usr/include/boost/type_traits/add_pointer.hpp \
 /usr/include/boost/core/addressof.hpp \
 /usr/include/boost/core/checked_delete.hpp \
 /usr/include/boost/core/noncopyable.hpp \
 /usr/include/boost/range/distance.hpp \
 /usr/include/boost/iterator/distance.hpp \
 /usr/include/boost/range/empty.hpp /usr/include/boost/range/rbegin.hpp \
 /usr/include/boost/range/reverse_iterator.hpp \
 /usr/include/boost/iterator/reverse_iterator.hpp \
 /usr/include/boost/iterator/iterator_adaptor.hpp \
 /usr/include/boost/core/use_default.hpp \
 /usr/include/boost/iterator/iterator_facade.hpp \
 /usr/include/boost/iterator/interoperable.hpp \
 /usr/include/boost/iterator/detail/facade_iterator_category.hpp \
 /usr/include/boost/detail/indirect_traits.hpp \
 /usr/include/boost/type_traits/is_pointer.hpp \
 /usr/include/boost/type_traits/is_member_pointer.hpp \
 /usr/include/boost/type_traits/remove_pointer.hpp \
 /usr/include/boost/detail/select_type.hpp \
 /usr/include/boost/iterator/detail/enable_if.hpp \
 /usr/include/boost/type_traits/is_pod.hpp \
 /usr/include/boost/type_traits/is_scalar.hpp \
 /usr/include/boost/mpl/always.hpp \
 /usr/include/boost/mpl/aux_/preprocessor/default_params.hpp \
 /usr/include/boost/mpl/apply.hpp /usr/include/boost/mpl/apply_fwd.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/apply_fwd.hpp \
 /usr/include/boost/mpl/apply_wrap.hpp \
 /usr/include/boost/mpl/aux_/has_apply.hpp \
 /usr/include/boost/mpl/aux_/config/has_apply.hpp \
 /usr/include/boost/mpl/aux_/msvc_never_true.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/apply_wrap.hpp \
 /usr/include/boost/mpl/lambda.hpp /usr/include/boost/mpl/bind.hpp \
 /usr/include/boost/mpl/bind_fwd.hpp \
 /usr/include/boost/mpl/aux_/config/bind.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/bind_fwd.hpp \
 /usr/include/boost/mpl/next.hpp /usr/include/boost/mpl/next_prior.hpp \
 /usr/include/boost/mpl/aux_/common_name_wknd.hpp \
 /usr/include/boost/mpl/protect.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/bind.hpp \
 /usr/include/boost/mpl/aux_/full_lambda.hpp \
 /usr/include/boost/mpl/quote.hpp /usr/include/boost/mpl/void.hpp \
 /usr/include/boost/mpl/aux_/has_type.hpp \
 /usr/include/boost/mpl/aux_/config/bcc.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/quote.hpp \
 /usr/include/boost/mpl/aux_/template_arity.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/template_arity.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/full_lambda.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/apply.hpp \
 /usr/include/boost/range/rend.hpp \
 /usr/include/boost/range/metafunctions.hpp \
 /usr/include/boost/range/category.hpp \
 /usr/include/boost/range/reference.hpp \
 /usr/include/boost/range/pointer.hpp \
 /usr/include/boost/range/iterator_range.hpp \
 /usr/include/boost/range/iterator_range_core.hpp \
 /usr/include/boost/type_traits/is_base_and_derived.hpp \
 /usr/include/boost/range/algorithm/equal.hpp \
 /usr/include/boost/range/detail/safe_bool.hpp \
 /usr/include/boost/next_prior.hpp \
 /usr/include/boost/type_traits/has_plus.hpp \
 /usr/include/boost/type_traits/detail/has_binary_operator.hpp \
 /usr/include/boost/type_traits/make_void.hpp \
 /usr/include/boost/type_traits/has_plus_assign.hpp \
 /usr/include/boost/type_traits/has_minus.hpp \
 /usr/include/boost/type_traits/has_minus_assign.hpp \
 /usr/include/boost/iterator/advance.hpp \
 /usr/include/boost/range/iterator_range_io.hpp \
 /usr/include/boost/range/sub_range.hpp \
 /usr/include/boost/numeric/odeint/stepper/stepper_categories.hpp \
 /usr/include/boost/numeric/odeint/integrate/null_observer.hpp \
 /usr/include/boost/numeric/odeint/integrate/check_adapter.hpp \
 /usr/include/boost/numeric/odeint/stepper/controlled_step_result.hpp \
 /usr/include/boost/numeric/odeint/integrate/detail/integrate_times.hpp \
 /usr/include/boost/throw_exception.hpp \
 /usr/include/boost/assert/source_location.hpp \
 /usr/include/boost/current_function.hpp \
 /usr/include/boost/exception/exception.hpp \
 /usr/include/boost/numeric/odeint/util/unwrap_reference.hpp \
 /usr/include/boost/numeric/odeint/config.hpp \
 /usr/include/boost/numeric/odeint/util/detail/less_with_sign.hpp \
 /usr/include/boost/numeric/odeint/util/unit_helper.hpp \
 /usr/include/boost/units/quantity.hpp \
 /usr/include/boost/units/conversion.hpp \
 /usr/include/boost/units/detail/conversion_impl.hpp \
 /usr/include/boost/mpl/divides.hpp \
 /usr/include/boost/mpl/aux_/arithmetic_op.hpp \
 /usr/include/boost/mpl/integral_c.hpp \
 /usr/include/boost/mpl/integral_c_fwd.hpp \
 /usr/include/boost/mpl/aux_/largest_int.hpp \
 /usr/include/boost/mpl/aux_/numeric_op.hpp \
 /usr/include/boost/mpl/numeric_cast.hpp /usr/include/boost/mpl/tag.hpp \
 /usr/include/boost/mpl/aux_/has_tag.hpp \
 /usr/include/boost/mpl/aux_/numeric_cast_utils.hpp \
 /usr/include/boost/mpl/aux_/config/forwarding.hpp \
 /usr/include/boost/mpl/aux_/msvc_eti_base.hpp \
 /usr/include/boost/mpl/aux_/is_msvc_eti_arg.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/divides.hpp \
 /usr/include/boost/units/heterogeneous_system.hpp \
 /usr/include/boost/mpl/plus.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/plus.hpp \
 /usr/include/boost/mpl/times.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/times.hpp \
 /usr/include/boost/mpl/negate.hpp /usr/include/boost/mpl/less.hpp \
 /usr/include/boost/mpl/aux_/comparison_op.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/less.hpp \
 /usr/include/boost/mpl/size.hpp /usr/include/boost/mpl/size_fwd.hpp \
 /usr/include/boost/mpl/sequence_tag.hpp \
 /usr/include/boost/mpl/sequence_tag_fwd.hpp \
 /usr/include/boost/mpl/aux_/has_begin.hpp \
 /usr/include/boost/mpl/aux_/size_impl.hpp \
 /usr/include/boost/mpl/begin_end.hpp \
 /usr/include/boost/mpl/begin_end_fwd.hpp \
 /usr/include/boost/mpl/aux_/begin_end_impl.hpp \
 /usr/include/boost/mpl/aux_/traits_lambda_spec.hpp \
 /usr/include/boost/mpl/distance.hpp \
 /usr/include/boost/mpl/distance_fwd.hpp \
 /usr/include/boost/mpl/iter_fold.hpp /usr/include/boost/mpl/O1_size.hpp \
 /usr/include/boost/mpl/O1_size_fwd.hpp \
 /usr/include/boost/mpl/aux_/O1_size_impl.hpp \
 /usr/include/boost/mpl/long.hpp /usr/include/boost/mpl/long_fwd.hpp \
 /usr/include/boost/mpl/aux_/has_size.hpp \
 /usr/include/boost/mpl/aux_/iter_fold_impl.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/iter_fold_impl.hpp \
 /usr/include/boost/mpl/iterator_range.hpp \
 /usr/include/boost/mpl/begin.hpp /usr/include/boost/mpl/deref.hpp \
 /usr/include/boost/mpl/aux_/msvc_type.hpp \
 /usr/include/boost/mpl/front.hpp /usr/include/boost/mpl/front_fwd.hpp \
 /usr/include/boost/mpl/aux_/front_impl.hpp \
 /usr/include/boost/mpl/push_front.hpp \
 /usr/include/boost/mpl/push_front_fwd.hpp \
 /usr/include/boost/mpl/aux_/push_front_impl.hpp \
 /usr/include/boost/mpl/pop_front.hpp \
 /usr/include/boost/mpl/pop_front_fwd.hpp \
 /usr/include/boost/mpl/aux_/pop_front_impl.hpp \
 /usr/include/boost/units/config.hpp /usr/include/boost/typeof/typeof.hpp \
 /usr/include/boost/typeof/message.hpp \
 /usr/include/boost/typeof/decltype.hpp \
 /usr/include/boost/units/static_rational.hpp \
 /usr/include/boost/integer/common_factor_ct.hpp \
 /usr/include/boost/integer_fwd.hpp /usr/include/boost/mpl/arithmetic.hpp \
 /usr/include/boost/mpl/minus.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/minus.hpp \
 /usr/include/boost/mpl/modulus.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/modulus.hpp \
 /usr/include/boost/mpl/multiplies.hpp \
 /usr/include/boost/units/operators.hpp \
 /usr/include/boost/typeof/incr_registration_group.hpp \
 /usr/include/boost/units/dimension.hpp \
 /usr/include/boost/units/detail/dimension_list.hpp \
 /usr/include/boost/units/dimensionless_type.hpp \
 /usr/include/boost/units/detail/dimension_impl.hpp \
 /usr/include/boost/mpl/list.hpp /usr/include/boost/mpl/limits/list.hpp \
 /usr/include/boost/mpl/list/list20.hpp \
 /usr/include/boost/mpl/list/list10.hpp \
 /usr/include/boost/mpl/list/list0.hpp \
 /usr/include/boost/mpl/list/aux_/push_front.hpp \
 /usr/include/boost/mpl/list/aux_/item.hpp \
 /usr/include/boost/mpl/list/aux_/tag.hpp \
 /usr/include/boost/mpl/list/aux_/pop_front.hpp \
 /usr/include/boost/mpl/list/aux_/push_back.hpp \
 /usr/include/boost/mpl/push_back_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/front.hpp \
 /usr/include/boost/mpl/list/aux_/clear.hpp \
 /usr/include/boost/mpl/clear_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/O1_size.hpp \
 /usr/include/boost/mpl/list/aux_/size.hpp \
 /usr/include/boost/mpl/list/aux_/empty.hpp \
 /usr/include/boost/mpl/empty_fwd.hpp \
 /usr/include/boost/mpl/list/aux_/begin_end.hpp \
 /usr/include/boost/mpl/list/aux_/iterator.hpp \
 /usr/include/boost/mpl/iterator_tags.hpp \
 /usr/include/boost/mpl/aux_/lambda_spec.hpp \
 /usr/include/boost/mpl/list/aux_/include_preprocessed.hpp \
 /usr/include/boost/mpl/list/aux_/preprocessed/plain/list10.hpp \
 /usr/include/boost/mpl/list/aux_/preprocessed/plain/list20.hpp \
 /usr/include/boost/mpl/aux_/preprocessed/gcc/list.hpp \
 /usr/include/boost/units/units_fwd.hpp \
 /usr/include/boost/units/detail/push_front_if.hpp \
 /usr/include/boost/units/detail/push_front_or_add.hpp \
 /usr/include/boost/units/detail/linear_algebra.hpp \
 /usr/include/boost/units/dim.hpp \
 /usr/include/boost/units/detail/dim_impl.hpp \
 /usr/include/boost/units/detail/sort.hpp \
 /usr/include/boost/units/detail/unscale.hpp \
 /usr/include/boost/units/scale.hpp \
 /usr/include/boost/units/detail/one.hpp \
 /usr/include/boost/units/detail/static_rational_power.hpp \
 /usr/include/boost/config/no_tr1/cmath.hpp \
 /usr/include/boost/units/homogeneous_system.hpp \
 /usr/include/boost/units/reduce_unit.hpp \
 /usr/include/boost/units/detail/heterogeneous_conversion.hpp \
 /usr/include/boost/units/detail/dimensionless_unit.hpp \
 /usr/include/boost/units/get_dimension.hpp \
 /usr/include/boost/units/get_system.hpp \
 /usr/include/boost/numeric/odeint/integrate/max_step_checker.hpp \
 /usr/include/boost/numeric/odeint/util/odeint_error.hpp \
 /work/main/models/side_wall.hpp \
 /work/main/models/tridiagonal_rosenbrock.hpp
